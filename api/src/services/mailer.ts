import nodemailer, { type Transporter } from 'nodemailer';
import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import type { Logger } from '../lib/logger';
import { startLocalSmtpServer, type LocalSmtpServer } from './mail-server';

export interface Mailer {
  transport: Transporter;
  /** The loopback server this process started, when SMTP_URL is unset. */
  localServer: LocalSmtpServer | null;
  close(): Promise<void>;
}

export async function createMailer(config: Config, db: DataSource, log: Logger): Promise<Mailer> {
  const localServer = config.smtpUrl ? null : await startLocalSmtpServer(db, log, config.localSmtpPort);
  const transport = nodemailer.createTransport(
    config.smtpUrl ?? { host: '127.0.0.1', port: localServer!.port, secure: false, ignoreTLS: true },
  );
  return {
    transport,
    localServer,
    async close() {
      transport.close();
      await localServer?.close();
    },
  };
}
