import { HttpProblem } from '../lib/problem';

export const planGranted = (planId: string) =>
  new HttpProblem({
    status: 409,
    slug: 'plan-granted',
    title: 'The plan was granted by an operator',
    detail: `An operator granted this tenant the ${planId} plan without payment; ask them to end the grant before buying or changing a plan.`,
  });

export const noSubscription = () =>
  new HttpProblem({ status: 409, slug: 'no-subscription', title: 'No subscription', detail: 'The tenant has no running subscription.' });
