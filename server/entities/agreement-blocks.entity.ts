import { Column, Entity, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { MapVersion } from './map-version.entity.js';

/** Per map version, robot and site-local day: returns and explained returns per square block of the map (heat layer). */
@Entity({ name: 'agreement_blocks' })
export class AgreementBlocks {
  @PrimaryColumn({ type: 'text', name: 'map_version_id' })
  mapVersionId: string;

  @ManyToOne(() => MapVersion, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'map_version_id' })
  mapVersion: Relation<MapVersion>;

  @PrimaryColumn({ type: 'text' })
  day: string;

  @PrimaryColumn({ type: 'text', name: 'robot_id' })
  robotId: string;

  /** Block side in cells when the counts were taken. */
  @Column({ type: 'integer', name: 'block_cells' })
  blockCells: number;

  /** Deflated little-endian uint32: returns per block (row-major from the bottom), then explained returns. */
  @Column({ type: 'blob' })
  data: Buffer;
}
