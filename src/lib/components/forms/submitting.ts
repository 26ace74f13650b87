import type { SubmitFunction } from '@sveltejs/kit';

/**
 * For `use:enhance`: reports busy while the action runs and, when it fails, empties password
 * fields (the server never sends them back; this keeps the browser from holding them either).
 */
export function submitting(setBusy: (busy: boolean) => void): SubmitFunction {
	return ({ formElement }) => {
		setBusy(true);
		return async ({ result, update }) => {
			await update();
			if (result.type === 'failure') {
				for (const input of formElement.querySelectorAll<HTMLInputElement>('input[type="password"]')) input.value = '';
			}
			setBusy(false);
		};
	};
}
