import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn } from 'typeorm';

@Entity('audit_events')
export class AuditEvent {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column('uuid', { name: 'tenant_id', nullable: true }) tenantId!: string | null;
  @Column('text') action!: string;
  @Column('uuid', { name: 'actor_user_id', nullable: true }) actorUserId!: string | null;
  @Column('uuid', { name: 'actor_api_key_id', nullable: true }) actorApiKeyId!: string | null;
  @Column('text', { name: 'actor_email', nullable: true }) actorEmail!: string | null;
  @Column('text', { nullable: true }) target!: string | null;
  @Column('text', { nullable: true }) ip!: string | null;
  @Column('jsonb') details!: Record<string, unknown>;
  @CreateDateColumn({ type: 'timestamptz', name: 'created_at' }) createdAt!: Date;
}
