import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { SeriesKind, SeriesRole } from '@gridwright/shared/series-roles';

export interface FilledRange {
  fromStep: number;
  toStep: number;
  policy: string;
}

/** An uploaded value column, resampled to whole steps: a power in kW, a price per kWh or a product rate in its own unit. */
@Entity('series')
export class Series {
  /** `ser_` + 32 hex digits, the form SPEC.md's `supply.seriesId` shows. */
  @PrimaryColumn('text') id!: string;
  @Column('uuid', { name: 'tenant_id' }) tenantId!: string;
  @Column('timestamptz', { name: 'created_at' }) createdAt!: Date;
  @Column('text') name!: string;
  @Column('text', { name: 'source_filename', nullable: true }) sourceFilename!: string | null;
  @Column('text', { name: 'source_column' }) sourceColumn!: string;
  @Column('text', { name: 'source_unit' }) sourceUnit!: string;
  @Column('timestamptz') start!: Date;
  @Column('text', { name: 'start_offset' }) startOffset!: string;
  @Column('integer', { name: 'step_minutes' }) stepMinutes!: number;
  @Column('integer') steps!: number;
  @Column('text') kind!: SeriesKind;
  /** `kW` for a power, `per kWh` for a price, the file's unit for a rate (e.g. `kg/h`). */
  @Column('text') unit!: string;
  @Column('jsonb', { name: 'step_values' }) values!: number[];
  /** The IANA zone the file's local timestamps were read in; null when they carried offsets. */
  @Column('text', { name: 'time_zone', nullable: true }) timeZone!: string | null;
  /** The columns of one file share it; null for series stored before uploads were grouped. */
  @Column('uuid', { name: 'upload_id', nullable: true }) uploadId!: string | null;
  /** The column's place among the file's value columns, from 0. */
  @Column('integer', { name: 'column_index', nullable: true }) columnIndex!: number | null;
  @Column('text', { name: 'suggested_role', nullable: true }) suggestedRole!: SeriesRole | null;
  @Column('integer', { name: 'source_rows' }) sourceRows!: number;
  @Column('jsonb') filled!: FilledRange[];
  @Column('text', { name: 'fill_policy' }) fillPolicy!: string;
}
