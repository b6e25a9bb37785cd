import { PageHeader } from '@/components/page-header';
import { AuditLog } from '../components/audit-log';

export function ActivityRoute() {
  return (
    <div>
      <PageHeader title="Activity log" subtitle="Security events of this tenant: sign-ins, keys, roles, plan changes." />
      <AuditLog scope="tenant" />
    </div>
  );
}
