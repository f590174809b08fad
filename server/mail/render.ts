import Handlebars from 'handlebars';
import { templates, type TemplateName } from './templates.js';

/** The usual caution every Driftline mail ends with. */
export const SAFETY_CAUTION =
  'Driftline informs map maintenance; it does not certify anything. The site’s safety assessment and local regulations rule.';

const compiled = new Map<TemplateName, { html: HandlebarsTemplateDelegate; text: HandlebarsTemplateDelegate }>();

/**
 * Renders a mail template: handlebars fills the mjml body (escaped values) and the plain-text
 * body, then mjml turns the body into table-based HTML with inline styles.
 */
export async function renderMail(name: TemplateName, data: Record<string, unknown>): Promise<{ html: string; text: string }> {
  let t = compiled.get(name);
  if (!t) {
    const source = templates[name];
    t = { html: Handlebars.compile(source.mjml, { strict: true }), text: Handlebars.compile(source.text, { strict: true, noEscape: true }) };
    compiled.set(name, t);
  }
  const context = { ...data, caution: SAFETY_CAUTION };
  // mjml is heavy to load (≈ 1 s of a busy start-up): load it with the first mail, not with the server.
  const { default: mjml2html } = await import('mjml');
  const { html, errors } = await mjml2html(t.html(context), { validationLevel: 'soft' });
  if (errors.length > 0) throw new Error(`The mail template ${name} is invalid: ${errors.map((e) => e.formattedMessage).join('; ')}`);
  return { html, text: t.text(context).replace(/\n{3,}/g, '\n\n').trim() + '\n' };
}
