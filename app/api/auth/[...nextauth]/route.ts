import NextAuth from 'next-auth';
import { NextRequest } from 'next/server';
import { authOptions } from '@/lib/auth/options';
import { readBodyText } from '@/lib/api/read-body';
import { errorResponse } from '@/lib/api/with-route';
import { env } from '@/lib/env';

const handler = NextAuth(authOptions);

// next-auth reads the whole form body itself: cap it first (413), since this route is open to anyone
async function POST(req: NextRequest, context: { params: Promise<{ nextauth: string[] }> }) {
  let text: string;
  try {
    text = await readBodyText(req, env().JSON_MAX_BYTES);
  } catch (err) {
    return errorResponse(err);
  }
  return handler(new NextRequest(req.url, { method: 'POST', headers: req.headers, body: text }), context);
}

export { handler as GET, POST };
