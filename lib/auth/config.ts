import NextAuth, { type DefaultSession } from 'next-auth';
import Credentials from 'next-auth/providers/credentials';
import { z } from 'zod';
import { getEnv } from '../env';
import { roles, type Role } from './roles';

/*
 * Sign-in with e-mail and password (Auth.js Credentials) and a JWT session carrying the user id and
 * role. The JWT is only a hint: requireUser() re-reads role and active flag from the database on
 * every request, so a deactivated user or a changed role takes effect at once. Stateless sessions
 * let several app servers run behind a load balancer.
 */

declare module 'next-auth' {
  interface User {
    role?: Role;
  }
  interface Session {
    user: { id: string; role: Role } & DefaultSession['user'];
  }
}

const credentialsSchema = z.object({
  email: z.email().max(254),
  password: z.string().min(1).max(256),
});

/** A shift is the longest a session lives; the app re-checks the account on every request anyway. */
const sessionMaxAgeSeconds = 10 * 60 * 60;

export const { handlers, auth, signIn, signOut } = NextAuth(() => ({
  secret: getEnv().AUTH_SECRET,
  trustHost: true,
  session: { strategy: 'jwt', maxAge: sessionMaxAgeSeconds },
  pages: { signIn: '/sign-in', error: '/sign-in' },
  providers: [
    Credentials({
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(raw) {
        const parsed = credentialsSchema.safeParse(raw);
        if (!parsed.success) return null;
        // Imported here so the edge-safe parts of this module never pull in the database driver.
        const { verifyCredentials } = await import('./credentials');
        const user = await verifyCredentials(parsed.data.email, parsed.data.password);
        return user ? { id: String(user.id), name: user.name, email: user.email, role: user.role } : null;
      },
    }),
  ],
  callbacks: {
    jwt({ token, user }) {
      if (user) {
        token.uid = user.id;
        token.role = user.role;
      }
      return token;
    },
    session({ session, token }) {
      const role = roles.includes(token.role as Role) ? (token.role as Role) : 'operator';
      session.user.id = String(token.uid ?? '');
      session.user.role = role;
      return session;
    },
  },
}));
