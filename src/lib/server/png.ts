import { error } from '@sveltejs/kit';
import { MAX_SNAPSHOT_BYTES } from '$lib/schemas/review';

// A snapshot is accepted only when its bytes are a PNG (the 8-byte signature and an IHDR chunk
// first, per the PNG specification, ISO/IEC 15948 §5.2 and §11.2.2), whatever the upload claims.

const SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];

export type PngInfo = { width: number; height: number };

/** Width and height when `bytes` start like a PNG, otherwise null. */
export function readPngHeader(bytes: Uint8Array): PngInfo | null {
	if (bytes.length < 33) return null;
	for (let i = 0; i < 8; i++) if (bytes[i] !== SIGNATURE[i]) return null;
	// First chunk: length 13, type "IHDR".
	const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
	if (view.getUint32(8) !== 13 || String.fromCharCode(bytes[12], bytes[13], bytes[14], bytes[15]) !== 'IHDR') return null;
	const width = view.getUint32(16);
	const height = view.getUint32(20);
	if (width === 0 || height === 0) return null;
	return { width, height };
}

const mib = (n: number) => `${(n / 1024 / 1024).toFixed(1)} MiB`;

/** Check an uploaded snapshot; 413 or 415 with a sentence that says what to do. */
export function checkSnapshot(bytes: Uint8Array): PngInfo {
	if (bytes.length > MAX_SNAPSHOT_BYTES)
		error(413, { message: `The snapshot is ${mib(bytes.length)}; at most ${mib(MAX_SNAPSHOT_BYTES)} is accepted. Capture a smaller area or zoom out.`, code: 'bad_request' });
	const info = readPngHeader(bytes);
	if (!info) error(415, { message: 'The snapshot is not a PNG image (its first bytes are not the PNG signature). Send the PNG the workbench captured.', code: 'bad_request' });
	return info;
}
