import { lazy, Suspense, type ReactNode } from 'react';
import { createBrowserRouter } from 'react-router-dom';
import { RequirePermission } from '@/components/require-permission';
import { Loading } from '@/components/states';
import { AcceptInvitationRoute } from '@/features/auth/routes/accept-invitation';
import { ForgotPasswordRoute } from '@/features/auth/routes/forgot-password';
import { ResetPasswordRoute } from '@/features/auth/routes/reset-password';
import { SignInRoute } from '@/features/auth/routes/sign-in';
import { AccountRoute } from '@/features/auth/routes/account';
import { ActivityRoute } from '@/features/audit/routes/activity';
import { ServiceAuditRoute } from '@/features/audit/routes/service-audit';
import { BillingRoute } from '@/features/billing/routes/billing';
import { ExportProfilesRoute } from '@/features/export-profiles/routes/export-profiles';
import { KeysRoute } from '@/features/keys/routes/keys';
import { OutboxRoute } from '@/features/operator/routes/outbox';
import { TenantsRoute } from '@/features/operator/routes/tenants';
import { RunsListRoute } from '@/features/runs/routes/runs-list';
import { TeamRoute } from '@/features/team/routes/team';
import { WebhooksRoute } from '@/features/webhooks/routes/webhooks';
import { AppShell, HomeRedirect } from './app-shell';
import { NotFoundRoute } from './not-found';

// The editor and the chart library are most of the bundle; only the screens that use them load them.
const RunDetailRoute = lazy(() => import('@/features/runs/routes/run-detail').then((m) => ({ default: m.RunDetailRoute })));
const WorkbenchRoute = lazy(() => import('@/features/workbench/routes/workbench').then((m) => ({ default: m.WorkbenchRoute })));
const UsageRoute = lazy(() => import('@/features/usage/routes/usage').then((m) => ({ default: m.UsageRoute })));
const TenantDetailRoute = lazy(() => import('@/features/operator/routes/tenant-detail').then((m) => ({ default: m.TenantDetailRoute })));

const guarded = (permission: string, element: ReactNode) => (
  <RequirePermission permission={permission}>
    <Suspense fallback={<Loading />}>{element}</Suspense>
  </RequirePermission>
);

export const router = createBrowserRouter([
  { path: '/sign-in', element: <SignInRoute /> },
  { path: '/forgot-password', element: <ForgotPasswordRoute /> },
  { path: '/reset-password', element: <ResetPasswordRoute /> },
  { path: '/accept-invitation', element: <AcceptInvitationRoute /> },
  {
    element: <AppShell />,
    children: [
      { index: true, element: <HomeRedirect /> },
      { path: 'runs', element: guarded('runs.read', <RunsListRoute />) },
      { path: 'runs/:runId', element: guarded('runs.read', <RunDetailRoute />) },
      { path: 'workbench', element: guarded('runs.create', <WorkbenchRoute />) },
      { path: 'keys', element: guarded('keys.read', <KeysRoute />) },
      { path: 'webhooks', element: guarded('webhooks.read', <WebhooksRoute />) },
      { path: 'export-profiles', element: guarded('exportProfiles.read', <ExportProfilesRoute />) },
      { path: 'usage', element: guarded('usage.read', <UsageRoute />) },
      { path: 'billing', element: guarded('billing.read', <BillingRoute />) },
      { path: 'team', element: guarded('members.read', <TeamRoute />) },
      { path: 'activity', element: guarded('audit.read', <ActivityRoute />) },
      { path: 'account', element: <AccountRoute /> },
      { path: 'operator/tenants', element: guarded('tenants.operate', <TenantsRoute />) },
      { path: 'operator/tenants/:tenantId', element: guarded('tenants.operate', <TenantDetailRoute />) },
      { path: 'operator/outbox', element: guarded('outbox.read', <OutboxRoute />) },
      { path: 'operator/audit', element: guarded('tenants.operate', <ServiceAuditRoute />) },
      { path: '*', element: <NotFoundRoute /> },
    ],
  },
]);
