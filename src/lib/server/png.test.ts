import { describe, expect, it } from 'vitest';
import { readPngHeader } from './png';

// Expected bytes from the PNG specification (ISO/IEC 15948 §5.2 signature, §11.2.2 IHDR layout).
function png(width: number, height: number): Uint8Array {
	const b = new Uint8Array(45);
	b.set([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);
	const v = new DataView(b.buffer);
	v.setUint32(16, width);
	v.setUint32(20, height);
	return b;
}

describe('readPngHeader', () => {
	it('reads width and height from IHDR', () => {
		expect(readPngHeader(png(640, 360))).toEqual({ width: 640, height: 360 });
	});
	it('refuses other formats and a truncated file', () => {
		const jpeg = new Uint8Array(64);
		jpeg.set([0xff, 0xd8, 0xff, 0xe0]);
		expect(readPngHeader(jpeg)).toBeNull();
		expect(readPngHeader(new TextEncoder().encode('<svg xmlns="http://www.w3.org/2000/svg"></svg>'))).toBeNull();
		expect(readPngHeader(png(1, 1).slice(0, 20))).toBeNull();
	});
	it('refuses a PNG signature followed by something other than IHDR', () => {
		const b = png(4, 4);
		b[12] = 0x49; b[13] = 0x44; b[14] = 0x41; b[15] = 0x54; // IDAT first
		expect(readPngHeader(b)).toBeNull();
	});
});
