// The entity classes and migrations TypeORM knows about. Listed explicitly (no globs) so that tsx,
// Vitest and the CLIs all load the same class objects.
import { ApiKey } from './entities/api-key';
import { BillingAccount } from './entities/billing-account';
import { AuditEvent } from './entities/audit-event';
import { Invitation } from './entities/invitation';
import { OutboxMessage } from './entities/outbox-message';
import { PasswordReset } from './entities/password-reset';
import { Plan } from './entities/plan';
import { RunUsage } from './entities/run-usage';
import { Session } from './entities/session';
import { Tenant } from './entities/tenant';
import { User } from './entities/user';
import { Accounts1780000000000 } from './migrations/1780000000000-accounts';
import { ExportProfile } from './entities/export-profile';
import { IdempotencyKey } from './entities/idempotency-key';
import { Run } from './entities/run';
import { Series } from './entities/series';
import { Study } from './entities/study';
import { WebhookDelivery } from './entities/webhook-delivery';
import { WebhookEndpoint } from './entities/webhook-endpoint';
import { Runs1780000100000 } from './migrations/1780000100000-runs';
import { QueueSchema1780000110000 } from './migrations/1780000110000-queue-schema';
import { Series1780000300000 } from './migrations/1780000300000-series';
import { Webhooks1780000310000 } from './migrations/1780000310000-webhooks';
import { ExportProfiles1780000320000 } from './migrations/1780000320000-export-profiles';
import { RunStatusCheck1780000400000 } from './migrations/1780000400000-run-status-check';
import { CredentialChangeNotices1780000520000 } from './migrations/1780000520000-credential-change-notices';
import { FairQueues1780000600000 } from './migrations/1780000600000-fair-queues';
import { InputGuards1780000500000 } from './migrations/1780000500000-input-guards';
import { Billing1780000760000 } from './migrations/1780000760000-billing';
import { RatePointReservations1780000530000 } from './migrations/1780000530000-rate-point-reservations';
import { SeriesKinds1780000710000 } from './migrations/1780000710000-series-kinds';
import { RevisionsAndStudies1780000770000 } from './migrations/1780000770000-revisions-and-studies';
import { RunChangeNotices1780000780000 } from './migrations/1780000780000-run-change-notices';

type Constructor = new (...args: any[]) => unknown;

export const entities: Constructor[] = [
  Plan, Tenant, User, Session, ApiKey, Invitation, PasswordReset, AuditEvent, OutboxMessage, RunUsage,
  Run, IdempotencyKey, Series, WebhookEndpoint, WebhookDelivery, ExportProfile, BillingAccount, Study,
];

export const migrations: Constructor[] = [
  Accounts1780000000000,
  Runs1780000100000, QueueSchema1780000110000, Series1780000300000, Webhooks1780000310000, ExportProfiles1780000320000,
  RunStatusCheck1780000400000,
  InputGuards1780000500000,
  CredentialChangeNotices1780000520000, RatePointReservations1780000530000,
  FairQueues1780000600000,
  SeriesKinds1780000710000,
  Billing1780000760000,
  RevisionsAndStudies1780000770000,
  RunChangeNotices1780000780000,
];
