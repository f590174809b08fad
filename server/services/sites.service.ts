import type { DataSource } from 'typeorm';
import type { Actor } from '../auth/actor.js';
import { isOperator } from '../auth/actor.js';
import { Organization, Robot, Site } from '../entities/index.js';
import { badRequest, conflict, notFound } from '../http-error.js';
import type { AuditService } from './audit.service.js';
import { newId } from './ids.js';

/** Sites scoped to the actor: operators see every site, customer users only their organization's. */
export class SitesService {
  constructor(
    private readonly db: DataSource,
    private readonly audit: AuditService,
  ) {}

  private scope(actor: Actor) {
    return isOperator(actor) ? {} : { organizationId: actor.organizationId };
  }

  /** A site (loaded with its organization) as the client sees it. */
  async view(site: Site) {
    return {
      id: site.id,
      name: site.name,
      city: site.city,
      timezone: site.timezone,
      organization: { id: site.organization.id, name: site.organization.name },
      robotCount: await this.db.getRepository(Robot).countBy({ siteId: site.id }),
    };
  }

  /** The site entities the actor may see, by organization then name. */
  async listVisible(actor: Actor): Promise<Site[]> {
    const sites = await this.db.getRepository(Site).find({ where: this.scope(actor), relations: { organization: true }, order: { name: 'ASC' } });
    return sites.sort((a, b) => a.organization.name.localeCompare(b.organization.name) || a.name.localeCompare(b.name));
  }

  /** The sites the actor may see as the client sees them, by organization then name. */
  async list(actor: Actor) {
    return Promise.all((await this.listVisible(actor)).map((s) => this.view(s)));
  }

  /** The site if the actor may see it; 404 otherwise, so that other organizations' ids do not leak. */
  async getVisible(actor: Actor, siteId: string): Promise<Site> {
    const site = await this.db.getRepository(Site).findOne({ where: { id: siteId, ...this.scope(actor) }, relations: { organization: true } });
    if (!site) throw notFound('The site');
    return site;
  }

  /** One visible site as the client sees it. */
  async get(actor: Actor, siteId: string) {
    return this.view(await this.getVisible(actor, siteId));
  }

  /** Creates a site for a customer organization (admins). */
  async create(actor: Actor, input: { name: string; city: string; timezone: string; organizationId: string }) {
    const org = await this.db.getRepository(Organization).findOneBy({ id: input.organizationId });
    if (!org) throw notFound('The organization');
    if (org.kind !== 'customer') throw badRequest('Sites belong to customer organizations.');
    if (await this.db.getRepository(Site).existsBy({ organizationId: org.id, name: input.name })) {
      throw conflict(`${org.name} already has a site named ${input.name}.`);
    }
    const site = this.db.getRepository(Site).create({ id: newId(), ...input, settings: {} });
    await this.db.transaction(async (m) => {
      await m.save(site);
      await this.audit.record(actor, { action: 'site.create', targetType: 'site', targetId: site.id, organizationId: org.id, summary: `${actor.name} created the site ${site.name} for ${org.name}.` }, m);
    });
    return this.get(actor, site.id);
  }
}
