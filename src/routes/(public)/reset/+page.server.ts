import { db } from '$lib/server/db';
import { formFailure, parseForm } from '$lib/server/forms';
import { passwordResetMail, sendMail } from '$lib/server/mail';
import { limits, TooManyAttempts } from '$lib/server/rate-limit';
import { createPasswordReset } from '$lib/server/repositories/password-resets';
import { findUserByEmail } from '$lib/server/repositories/users';
import { resetRequestSchema } from '$lib/schemas/auth';
import type { Actions } from './$types';

export const actions: Actions = {
	default: async ({ request, getClientAddress, setHeaders }) => {
		const form = await parseForm(request, resetRequestSchema);
		if (!form.ok) return form.failure;
		const { email } = form.data;
		try {
			await limits.reset.consume(email, getClientAddress());
		} catch (e) {
			if (!(e instanceof TooManyAttempts)) throw e;
			setHeaders({ 'retry-after': String(e.retryAfterSeconds) });
			return formFailure(429, e.message, form.raw);
		}
		const user = await findUserByEmail(db, email);
		if (user) {
			const token = await createPasswordReset(db, user.id);
			await sendMail(passwordResetMail({ to: user.email, name: user.name, token }));
		}
		// The same answer either way, so the form does not tell who has an account.
		return { sent: true, email };
	}
};
