import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn } from 'typeorm';
import type { Role } from '../../lib/roles-and-scopes';

@Entity('users')
export class User {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column('text') email!: string;
  @Column('text') name!: string;
  @Column('text', { name: 'password_hash', nullable: true }) passwordHash!: string | null;
  /** null for operators, who belong to the service rather than to a tenant. */
  @Column('uuid', { name: 'tenant_id', nullable: true }) tenantId!: string | null;
  @Column('text') role!: Role;
  @CreateDateColumn({ type: 'timestamptz', name: 'created_at' }) createdAt!: Date;
  @Column('timestamptz', { name: 'password_changed_at', nullable: true }) passwordChangedAt!: Date | null;
  @Column('timestamptz', { name: 'last_sign_in_at', nullable: true }) lastSignInAt!: Date | null;
}
