import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { z } from 'zod';
import { getDb } from '@/db/client';
import { env } from '@/lib/env';
import { attemptSignIn } from '@/lib/services/sign-in';
import { clientIp } from './client-ip';

const noNul = (s: string) => !s.includes('\u0000');
const credentialsSchema = z.object({ email: z.string().trim().min(1).max(320).refine(noNul), password: z.string().min(1).max(1024).refine(noNul) });

// authorize() throws 'TooManyAttempts' or returns null ('CredentialsSignin'); the sign-in form words both.
export const authOptions: NextAuthOptions = {
  // next-auth reads NEXTAUTH_SECRET itself; lib/env.ts checks it at boot (instrumentation.ts)
  session: { strategy: 'jwt', maxAge: 12 * 60 * 60 },
  pages: { signIn: '/sign-in' },
  providers: [
    CredentialsProvider({
      name: 'E-mail and password',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        const parsed = credentialsSchema.safeParse(credentials);
        if (!parsed.success) return null;
        const e = env();
        const result = await attemptSignIn(
          getDb(),
          { ...parsed.data, ip: clientIp(req?.headers ?? {}) },
          { maxPerEmail: e.SIGNIN_MAX_PER_EMAIL, maxPerIp: e.SIGNIN_MAX_PER_IP, windowSeconds: e.SIGNIN_WINDOW_SECONDS },
        );
        if (result.ok) return { id: result.userId };
        if (result.reason === 'too_many_attempts') throw new Error('TooManyAttempts');
        return null;
      },
    }),
  ],
  callbacks: {
    // Only the user id travels in the token: role and organisation are read from the database per request.
    async jwt({ token, user }) {
      if (user) token.sub = user.id;
      return token;
    },
    async session({ session, token }) {
      return { ...session, userId: token.sub };
    },
  },
};
