import { Column, Entity, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { MapVersion } from './map-version.entity.js';

/** Hit and pass counters of one 128 × 128-cell chunk of a map version, from one robot on one site-local day. */
@Entity({ name: 'evidence_chunks' })
export class EvidenceChunk {
  @PrimaryColumn({ type: 'text', name: 'map_version_id' })
  mapVersionId: string;

  @ManyToOne(() => MapVersion, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'map_version_id' })
  mapVersion: Relation<MapVersion>;

  /** Site-local day, YYYY-MM-DD. */
  @PrimaryColumn({ type: 'text' })
  day: string;

  /** Kept per robot so that a robot whose scanner is suspect can be left out of change detection. */
  @PrimaryColumn({ type: 'text', name: 'robot_id' })
  robotId: string;

  /** Chunk column and row (chunk (cx, cy) covers cells i ∈ [128·cx, 128·cx + 128), j likewise). */
  @PrimaryColumn({ type: 'integer' })
  cx: number;

  @PrimaryColumn({ type: 'integer' })
  cy: number;

  /** Deflated little-endian Uint32 hits then passes. */
  @Column({ type: 'blob' })
  data: Buffer;

  @Column({ type: 'datetime', name: 'updated_at' })
  updatedAt: Date;
}
