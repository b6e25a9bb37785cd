import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn } from 'typeorm';
import type { Scope } from '../../lib/roles-and-scopes';

@Entity('api_keys')
export class ApiKey {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column('uuid', { name: 'tenant_id' }) tenantId!: string;
  @Column('text') name!: string;
  /** The visible, unique part of the key used to find it (`gw_<prefix>_…`). */
  @Column('text') prefix!: string;
  /** sha256 of the whole key, hex. The key itself is shown once and never stored. */
  @Column('text', { name: 'secret_hash', select: false }) secretHash!: string;
  @Column('text', { array: true }) scopes!: Scope[];
  @Column('timestamptz', { name: 'expires_at', nullable: true }) expiresAt!: Date | null;
  @Column('timestamptz', { name: 'revoked_at', nullable: true }) revokedAt!: Date | null;
  @Column('timestamptz', { name: 'last_used_at', nullable: true }) lastUsedAt!: Date | null;
  @Column('uuid', { name: 'created_by', nullable: true }) createdBy!: string | null;
  @CreateDateColumn({ type: 'timestamptz', name: 'created_at' }) createdAt!: Date;
}
