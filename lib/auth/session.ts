import { getServerSession } from 'next-auth';
import { redirect } from 'next/navigation';
import { getDb } from '@/db/client';
import { authOptions } from './options';
import { loadPrincipal, type Principal } from './principal';

/** The signed-in principal for a page or route handler, read fresh from the database. */
export async function currentPrincipal(): Promise<Principal | undefined> {
  const session = (await getServerSession(authOptions)) as { userId?: string } | null;
  if (!session?.userId) return undefined;
  return loadPrincipal(getDb(), session.userId);
}

/** For pages: the principal, or a redirect to the sign-in page. */
export async function requirePrincipal(): Promise<Principal> {
  const p = await currentPrincipal();
  if (!p) redirect('/sign-in');
  return p;
}
