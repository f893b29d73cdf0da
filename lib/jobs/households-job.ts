import { recomputeHouseholds } from '@/lib/services/households';
import type { JobHandler } from './kinds';

/** Households passed and connected, derived again from the plan, the built record and the register. */
export const householdsJob: JobHandler = async ({ db, projectId, progress }) => {
  const out = await recomputeHouseholds(db, projectId, progress);
  return { message: `${out.addressesPassed} of ${out.addresses} addresses passed (${out.householdsPassed} of ${out.households} households), ${out.addressesConnected} connected`, result: { ...out } };
};
