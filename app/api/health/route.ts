import { NextResponse } from 'next/server';
import { getDb } from '@/db/client';

export const dynamic = 'force-dynamic';

export async function GET() {
  try {
    await getDb().raw('select 1');
    return NextResponse.json({ ok: true, db: 'up' });
  } catch (err) {
    console.error('[trenchbook] health: database unreachable', err);
    return NextResponse.json({ ok: false, db: 'down' }, { status: 503 });
  }
}
