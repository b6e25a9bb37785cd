import { Column, Entity, PrimaryColumn } from 'typeorm';

@Entity('plans')
export class Plan {
  @PrimaryColumn('text') id!: string;
  @Column('text') name!: string;
  @Column('text') description!: string;
  @Column('integer', { name: 'monthly_runs' }) monthlyRuns!: number;
  @Column('integer', { name: 'monthly_solver_seconds' }) monthlySolverSeconds!: number;
  @Column('integer', { name: 'max_steps' }) maxSteps!: number;
  @Column('integer', { name: 'max_units' }) maxUnits!: number;
  @Column('integer', { name: 'requests_per_second' }) requestsPerSecond!: number;
  @Column('integer', { name: 'concurrent_runs' }) concurrentRuns!: number;
  @Column('integer', { name: 'webhook_endpoints' }) webhookEndpoints!: number;
  @Column('integer', { name: 'sort_order' }) sortOrder!: number;
  /** The payment provider's price this plan is sold at, by its lookup key; null: not for sale. */
  @Column('text', { name: 'price_lookup_key', nullable: true }) priceLookupKey!: string | null;
}
