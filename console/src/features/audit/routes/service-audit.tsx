import { PageHeader } from '@/components/page-header';
import { AuditLog } from '../components/audit-log';

export function ServiceAuditRoute() {
  return (
    <div>
      <PageHeader title="Service audit" subtitle="Security events of every tenant and of the service itself, newest first." />
      <AuditLog scope="service" />
    </div>
  );
}
