import { simpleParser, type AddressObject, type Attachment } from 'mailparser';
import type { DataSource } from 'typeorm';
import { CapturedMail } from '../entities/index.js';
import { notFound } from '../http-error.js';

const addressText = (a: AddressObject | AddressObject[] | undefined): string =>
  (Array.isArray(a) ? a : a ? [a] : []).map((x) => x.text).join(', ');

/** The id a part is addressed by in the API: its content id when it has one, else its position. */
const partId = (a: Attachment, index: number): string => (a.contentId ? a.contentId.replace(/^<|>$/g, '') : `part-${index + 1}`);

/** The captured messages of the built-in SMTP server, parsed on demand for the admin outbox. */
export class OutboxService {
  constructor(private readonly db: DataSource) {}

  /** Newest first, without the raw bytes. */
  async list(limit: number, offset: number) {
    const [rows, total] = await this.db.getRepository(CapturedMail).findAndCount({
      select: { id: true, receivedAt: true, envelopeFrom: true, envelopeTo: true, subject: true, size: true },
      order: { receivedAt: 'DESC', id: 'DESC' },
      take: limit,
      skip: offset,
    });
    return {
      total,
      messages: rows.map((m) => ({ id: m.id, receivedAt: m.receivedAt.toISOString(), from: m.envelopeFrom, to: m.envelopeTo, subject: m.subject, size: m.size })),
    };
  }

  private async parse(id: string) {
    const row = await this.db.getRepository(CapturedMail).findOneBy({ id });
    if (!row) throw notFound('The captured message');
    return { row, parsed: await simpleParser(row.raw, { skipImageLinks: true, skipTextToHtml: true }) };
  }

  /** One message: headers, HTML with cid: images pointing at the parts route, text, attachments. */
  async get(id: string) {
    const { row, parsed } = await this.parse(id);
    const parts = parsed.attachments.map((a, i) => ({
      id: partId(a, i),
      filename: a.filename ?? null,
      contentType: a.contentType,
      size: a.size,
      inline: Boolean(a.contentId && a.related),
    }));
    const byCid = new Set(parts.map((p) => p.id));
    const html =
      typeof parsed.html === 'string'
        ? parsed.html.replace(/(["'(])cid:([^"')\s]+)/g, (whole, lead: string, cid: string) =>
            byCid.has(cid) ? `${lead}/api/outbox/${row.id}/parts/${encodeURIComponent(cid)}` : whole,
          )
        : null;
    return {
      id: row.id,
      receivedAt: row.receivedAt.toISOString(),
      envelope: { from: row.envelopeFrom, to: row.envelopeTo },
      messageId: parsed.messageId ?? null,
      subject: parsed.subject ?? '',
      from: addressText(parsed.from),
      to: addressText(parsed.to),
      date: parsed.date?.toISOString() ?? null,
      html,
      text: parsed.text ?? null,
      attachments: parts,
      size: row.size,
    };
  }

  /** The bytes of one attachment or inline image. */
  async part(id: string, part: string) {
    const { parsed } = await this.parse(id);
    const index = parsed.attachments.findIndex((a, i) => partId(a, i) === part);
    if (index < 0) throw notFound('The message part');
    const a = parsed.attachments[index];
    return { filename: a.filename ?? part, contentType: a.contentType, content: a.content, inline: Boolean(a.contentId && a.related) };
  }
}
