import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, unwrap, type Schemas } from '@/lib/api-client';

export type BillingOverview = Schemas['BillingOverview'];
export type Invoice = Schemas['Invoice'];
export type UpcomingInvoice = Schemas['UpcomingInvoice'];

export const billingQueryKey = ['billing'] as const;

export const getBilling = () => unwrap(api.GET('/v1/billing'));
export const getBillingQueryOptions = () => queryOptions({ queryKey: [...billingQueryKey, 'overview'], queryFn: getBilling });
/** `waitingForProvider`: just back from the checkout page, the plan changes when the provider's events arrive. */
export const useBilling = (waitingForProvider = false) =>
  useQuery({ ...getBillingQueryOptions(), refetchInterval: (q) => (waitingForProvider && q.state.data?.planSource !== 'subscription' ? 1000 : false) });

export const listInvoices = (cursor: string | null) => unwrap(api.GET('/v1/billing/invoices', { params: { query: { limit: 10, cursor: cursor ?? undefined } } }));
export const getInvoicesQueryOptions = (cursor: string | null) =>
  queryOptions({ queryKey: [...billingQueryKey, 'invoices', cursor], queryFn: () => listInvoices(cursor), placeholderData: keepPreviousData });
export const useInvoices = (cursor: string | null, enabled: boolean) => useQuery({ ...getInvoicesQueryOptions(cursor), enabled });

export const getUpcomingInvoice = () => unwrap(api.GET('/v1/billing/upcoming-invoice'));
export const getUpcomingInvoiceQueryOptions = () => queryOptions({ queryKey: [...billingQueryKey, 'upcoming'], queryFn: getUpcomingInvoice });
export const useUpcomingInvoice = (enabled: boolean) => useQuery({ ...getUpcomingInvoiceQueryOptions(), enabled });

function useBillingMutation<I, O>(fn: (input: I) => Promise<O>, onDone?: (output: O) => void) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: fn,
    onSuccess: async (output) => {
      // The plan shows on the usage page and in the tenant's limits too.
      await Promise.all([billingQueryKey, ['tenant'], ['usage']].map((queryKey) => queryClient.invalidateQueries({ queryKey })));
      onDone?.(output);
    },
  });
}

/** Starts a checkout and sends the browser to the payment provider's page. */
export const useStartCheckout = () =>
  useBillingMutation(
    (planId: string) => unwrap(api.POST('/v1/billing/checkout', { body: { planId } })),
    (session) => window.location.assign(session.url),
  );

export const useChangePlan = () => useBillingMutation((planId: string) => unwrap(api.PUT('/v1/tenant/plan', { body: { planId } })));
export const useCancelSubscription = () => useBillingMutation(() => unwrap(api.POST('/v1/billing/subscription/cancel')));
export const useResumeSubscription = () => useBillingMutation(() => unwrap(api.POST('/v1/billing/subscription/resume')));
