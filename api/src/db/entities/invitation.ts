import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn } from 'typeorm';
import type { TenantRole } from '../../lib/roles-and-scopes';

@Entity('invitations')
export class Invitation {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column('uuid', { name: 'tenant_id' }) tenantId!: string;
  @Column('text') email!: string;
  @Column('text') role!: TenantRole;
  @Column('text', { name: 'token_hash', select: false }) tokenHash!: string;
  @Column('uuid', { name: 'invited_by', nullable: true }) invitedBy!: string | null;
  @CreateDateColumn({ type: 'timestamptz', name: 'created_at' }) createdAt!: Date;
  @Column('timestamptz', { name: 'expires_at' }) expiresAt!: Date;
  @Column('timestamptz', { name: 'accepted_at', nullable: true }) acceptedAt!: Date | null;
  @Column('timestamptz', { name: 'revoked_at', nullable: true }) revokedAt!: Date | null;
}
