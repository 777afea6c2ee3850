import { SvelteKitAuth, CredentialsSignin } from '@auth/sveltekit';
import Credentials from '@auth/sveltekit/providers/credentials';
import { z } from 'zod';
import * as staff from '$lib/server/staff/queries';
import { burnVerify, verifyPassword } from '$lib/server/passwords';
import type { Role } from '$lib/roles';

export class DisabledAccount extends CredentialsSignin {
	code = 'disabled';
}

const credentials = z.object({ email: z.email(), password: z.string().min(1).max(200) });

export const {
	handle: authHandle,
	signIn,
	signOut
} = SvelteKitAuth({
	// Credentials only work with JWT sessions. The hook re-reads the user on every request,
	// so a role change or a disabled account takes effect at once despite the token.
	session: { strategy: 'jwt', maxAge: 12 * 60 * 60 },
	// @auth/sveltekit ignores AUTH_TRUST_HOST in production builds; adapter-node sits behind ORIGIN.
	trustHost: true,
	secret: process.env.AUTH_SECRET,
	pages: { signIn: '/signin' },
	providers: [
		Credentials({
			credentials: { email: { type: 'email' }, password: { type: 'password' } },
			async authorize(raw) {
				const parsed = credentials.safeParse(raw);
				if (!parsed.success) return null;
				const user = await staff.findByEmail(parsed.data.email);
				if (!user) return burnVerify(parsed.data.password).then(() => null);
				if (!(await verifyPassword(user.passwordHash, parsed.data.password))) return null;
				if (user.disabled) throw new DisabledAccount();
				return { id: user.id, email: user.email, name: user.name, role: user.role };
			}
		})
	],
	callbacks: {
		jwt({ token, user }) {
			if (user) {
				token.sub = user.id;
				token.role = (user as { role: Role }).role;
			}
			return token;
		},
		session({ session, token }) {
			session.user.id = token.sub!;
			session.user.role = token.role as Role;
			return session;
		}
	}
});
