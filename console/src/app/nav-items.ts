export interface NavItem {
  to: string;
  label: string;
  permission: string;
  group: 'work' | 'tenant' | 'operator';
}

/** Navigation, each entry behind the permission its page needs (the same one its route guard checks). */
export const navItems: NavItem[] = [
  { to: '/runs', label: 'Runs', permission: 'runs.read', group: 'work' },
  { to: '/workbench', label: 'Workbench', permission: 'runs.create', group: 'work' },
  { to: '/keys', label: 'API keys', permission: 'keys.read', group: 'tenant' },
  { to: '/webhooks', label: 'Webhooks', permission: 'webhooks.read', group: 'tenant' },
  { to: '/export-profiles', label: 'CSV exports', permission: 'exportProfiles.read', group: 'tenant' },
  { to: '/usage', label: 'Usage', permission: 'usage.read', group: 'tenant' },
  { to: '/billing', label: 'Billing', permission: 'billing.read', group: 'tenant' },
  { to: '/team', label: 'Team', permission: 'members.read', group: 'tenant' },
  { to: '/activity', label: 'Activity log', permission: 'audit.read', group: 'tenant' },
  { to: '/operator/tenants', label: 'Tenants', permission: 'tenants.operate', group: 'operator' },
  { to: '/operator/outbox', label: 'E-mail outbox', permission: 'outbox.read', group: 'operator' },
  { to: '/operator/audit', label: 'Service audit', permission: 'tenants.operate', group: 'operator' },
];

export const groupLabels: Record<NavItem['group'], string> = { work: 'Scheduling', tenant: 'Tenant', operator: 'Operator' };
