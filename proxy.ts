import { withAuth } from 'next-auth/middleware';

// Pages need a session; /api is deliberately left out: API routes authenticate in their wrapper
// (session cookie or Bearer token), and a proxy in front of them would cap request bodies.
export default withAuth({ pages: { signIn: '/sign-in' } });

export const config = {
  matcher: ['/((?!api|_next/static|_next/image|favicon.svg|sign-in|welcome).*)'],
};
