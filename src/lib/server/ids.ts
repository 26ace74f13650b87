import { createHash, randomBytes } from 'node:crypto';

const ALPHABET = 'abcdefghijklmnopqrstuvwxyz234567';

function base32(bytes: Uint8Array): string {
	let out = '';
	let bits = 0;
	let value = 0;
	for (const b of bytes) {
		value = (value << 8) | b;
		bits += 8;
		while (bits >= 5) {
			out += ALPHABET[(value >>> (bits - 5)) & 31];
			bits -= 5;
		}
	}
	if (bits > 0) out += ALPHABET[(value << (5 - bits)) & 31];
	return out;
}

/** Row ids: 24 lowercase base32 characters (120 random bits), made in code, not by the database. */
export function newId(): string {
	return base32(randomBytes(15));
}

/** A secret for a link or an API token: 32 base32 characters (160 bits). Only its hash is stored. */
export function newSecret(): string {
	return base32(randomBytes(20));
}

/** sha-256, hex. Secrets are looked up by this hash, so a leaked table reveals no usable token. */
export function sha256(value: string): string {
	return createHash('sha256').update(value).digest('hex');
}
