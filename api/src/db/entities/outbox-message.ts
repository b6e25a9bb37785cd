import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';

/** One message as the local SMTP server received it. */
@Entity('outbox_messages')
export class OutboxMessage {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column('timestamptz', { name: 'received_at' }) receivedAt!: Date;
  @Column('uuid', { name: 'tenant_id', nullable: true }) tenantId!: string | null;
  @Column('text') kind!: string;
  @Column('text', { name: 'mail_from' }) mailFrom!: string;
  @Column('text', { name: 'rcpt_to', array: true }) rcptTo!: string[];
  @Column('text') subject!: string;
  @Column('text', { name: 'text_body', nullable: true }) textBody!: string | null;
  @Column('text', { name: 'html_body', nullable: true }) htmlBody!: string | null;
  @Column('text', { name: 'message_id', nullable: true }) messageId!: string | null;
  @Column('text') raw!: string;
}
