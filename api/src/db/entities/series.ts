import { Column, Entity, PrimaryColumn } from 'typeorm';

export interface FilledRange {
  fromStep: number;
  toStep: number;
  policy: string;
}

/** An uploaded value column, resampled to whole steps and converted to kW. */
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
  @Column('jsonb', { name: 'values_kw' }) valuesKw!: number[];
  @Column('integer', { name: 'source_rows' }) sourceRows!: number;
  @Column('jsonb') filled!: FilledRange[];
  @Column('text', { name: 'fill_policy' }) fillPolicy!: string;
}
