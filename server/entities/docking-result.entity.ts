import { Column, Entity, Index, JoinColumn, ManyToOne, PrimaryColumn, type Relation } from 'typeorm';
import { DockingBatch } from './docking-batch.entity.js';
import { DockingStation } from './docking-station.entity.js';

/** One docking of a robot at a station: its final offset from the nominal docking pose (metres, radians). */
@Entity({ name: 'docking_results' })
@Index('IDX_docking_results_station_time', ['stationId', 'tMs'])
// One docking of one robot at one station at one time: the same result in a later batch is not counted twice.
@Index('IDX_docking_results_unique', ['stationId', 'robotId', 'tMs'], { unique: true })
export class DockingResult {
  @PrimaryColumn({ type: 'text' })
  id: string;

  @Column({ type: 'text', name: 'station_id' })
  stationId: string;

  @ManyToOne(() => DockingStation, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'station_id', foreignKeyConstraintName: 'FK_docking_results_station' })
  station: Relation<DockingStation>;

  /** The robot that docked (kept when the robot is removed later). */
  @Column({ type: 'text', name: 'robot_id' })
  robotId: string;

  /** The receipt of the batch that brought it. */
  @Column({ type: 'text', name: 'batch_id' })
  batchId: string;

  @ManyToOne(() => DockingBatch, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'batch_id', foreignKeyConstraintName: 'FK_docking_results_batch' })
  batch: Relation<DockingBatch>;

  /** The station's model when the result arrived; the drift check reads only the current model's results. */
  @Column({ type: 'text', name: 'model_version_id', nullable: true })
  modelVersionId: string | null;

  /** Time of the docking, ms since the epoch. */
  @Column({ type: 'integer', name: 't_ms' })
  tMs: number;

  @Column({ type: 'real' })
  dx: number;

  @Column({ type: 'real' })
  dy: number;

  @Column({ type: 'real' })
  dyaw: number;
}
