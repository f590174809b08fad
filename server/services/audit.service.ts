import type { DataSource } from 'typeorm';
import type { Actor } from '../auth/actor.js';
import { AuditEvent } from '../entities/index.js';
import { isOperator } from '../auth/actor.js';

/** What one audit row records; `summary` is a readable sentence. */
export interface AuditEntry {
  action: string;
  targetType: string;
  targetId?: string | null;
  organizationId?: string | null;
  summary: string;
  details?: Record<string, unknown>;
}

/** Appends and reads the audit log. */
export class AuditService {
  constructor(private readonly db: DataSource) {}

  /** Records one event; pass the transaction's manager to keep it atomic with the change. */
  async record(actor: Actor | null, entry: AuditEntry, manager = this.db.manager): Promise<void> {
    await manager.save(manager.create(AuditEvent, {
      at: new Date(),
      actorId: actor?.id ?? null,
      action: entry.action,
      targetType: entry.targetType,
      targetId: entry.targetId ?? null,
      organizationId: entry.organizationId ?? null,
      summary: entry.summary,
      details: entry.details ?? null,
    }));
  }

  /** Newest first; operators read everything, customers only their organization's events. */
  async list(actor: Actor, limit: number) {
    const rows = await this.db.getRepository(AuditEvent).find({
      where: isOperator(actor) ? {} : { organizationId: actor.organizationId },
      relations: { actor: true },
      order: { at: 'DESC', id: 'DESC' },
      take: limit,
    });
    return rows.map((e) => ({
      id: e.id,
      at: e.at.toISOString(),
      actor: e.actor ? { id: e.actor.id, name: e.actor.name } : null,
      action: e.action,
      targetType: e.targetType,
      targetId: e.targetId,
      summary: e.summary,
    }));
  }
}
