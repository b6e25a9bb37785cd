import type { EntityManager } from 'typeorm';
import { BillingAccount } from '../db/entities/billing-account';

/**
 * The tenant's billing account, made if it has none, locked until the transaction ends: everything
 * that changes a tenant's billing (events, the owner's changes, grants, the grace sweep) goes through
 * this lock, so two of them never interleave their reads of the provider and their writes.
 */
export async function lockBillingAccount(manager: EntityManager, tenantId: string): Promise<BillingAccount> {
  await manager.query(`INSERT INTO billing_accounts (tenant_id) VALUES ($1) ON CONFLICT (tenant_id) DO NOTHING`, [tenantId]);
  return manager
    .getRepository(BillingAccount)
    .createQueryBuilder('b')
    .setLock('pessimistic_write')
    .where('b.tenant_id = :tenantId', { tenantId })
    .getOneOrFail();
}

export function findBillingAccount(manager: EntityManager, tenantId: string): Promise<BillingAccount | null> {
  return manager.findOneBy(BillingAccount, { tenantId });
}

export function billingAccountOfCustomer(manager: EntityManager, customerId: string): Promise<BillingAccount | null> {
  return manager.findOneBy(BillingAccount, { customerId });
}
