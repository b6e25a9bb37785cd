import { Column, Entity, PrimaryColumn } from 'typeorm';

@Entity('export_profiles')
export class ExportProfile {
  @PrimaryColumn('uuid') id!: string;
  @Column('uuid', { name: 'tenant_id' }) tenantId!: string;
  @Column('timestamptz', { name: 'created_at' }) createdAt!: Date;
  @Column('timestamptz', { name: 'updated_at' }) updatedAt!: Date;
  @Column('text') name!: string;
  @Column('text', { name: 'power_unit' }) powerUnit!: 'kW' | 'MW';
  @Column('text') timestamps!: 'utc' | 'offset';
  @Column('text') delimiter!: string;
  @Column('jsonb', { name: 'tag_map' }) tagMap!: Record<string, string>;
}
