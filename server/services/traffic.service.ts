import { Between, type DataSource } from 'typeorm';
import { HourlyTraffic } from '../entities/index.js';

/** A site's scans and returns per UTC hour, as ingest counted them (all map versions). */
export class TrafficService {
  constructor(private readonly db: DataSource) {}

  /** Hours with scans whose start lies in [fromMs, toMs), oldest first. */
  async hourly(siteId: string, fromMs: number, toMs: number): Promise<Array<{ hourStartMs: number; scans: number; returns: number }>> {
    const rows = await this.db.getRepository(HourlyTraffic).find({ where: { siteId, hourStartMs: Between(fromMs, toMs - 1) }, order: { hourStartMs: 'ASC' } });
    return rows.map(({ hourStartMs, scans, returns }) => ({ hourStartMs, scans, returns }));
  }
}
