import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn } from 'typeorm';

@Entity('sessions')
export class Session {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column('uuid', { name: 'user_id' }) userId!: string;
  @Column('text', { name: 'csrf_token' }) csrfToken!: string;
  @CreateDateColumn({ type: 'timestamptz', name: 'created_at' }) createdAt!: Date;
  @Column('timestamptz', { name: 'expires_at' }) expiresAt!: Date;
  @Column('timestamptz', { name: 'revoked_at', nullable: true }) revokedAt!: Date | null;
  @Column('text', { name: 'revoked_reason', nullable: true }) revokedReason!: string | null;
  @Column('text', { nullable: true }) ip!: string | null;
  @Column('text', { name: 'user_agent', nullable: true }) userAgent!: string | null;
}
