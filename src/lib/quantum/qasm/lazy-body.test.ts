import { describe, expect, it } from 'vitest';
import { importQasm } from './import.js';
import { FAST_PATH } from './parser.js';

// The importer keeps the fast path's gates as ints and makes their items when the document's body
// is first read (`emit.ts: GateEmitter`, `documentWithBody`). These tests read the body in every
// way a consumer does (property, spread, JSON, structured clone as worker messages use) and check
// it is the same document the token path makes with every item made at once.

// Our own file: fast-path gates, a broadcast (compacted into a block), a defined gate, a
// controlled phase written with CNOTs (recognised, so the body is the rewritten one), a barrier.
const MIXED = `OPENQASM 2.0;
include "qelib1.inc";
gate twist(t) a, b { cx a, b; u1(t) b; cx a, b; }
qreg q[4];
qreg anc[1];
h q[0];
cx q[0], q[1];
u1(pi/8) q[2];
h q;
twist(pi/4) q[1], q[3];
cx q[2], q[3];
rz(0.392699) q[3];
cx q[2], q[3];
barrier q;
swap q[0], q[3];
ccx q[0], q[1], anc[0];
`;

function tokenPathImport(text: string) {
	FAST_PATH.enabled = false;
	try {
		const r = importQasm(text, { file: 'mixed.qasm' });
		return { document: JSON.parse(JSON.stringify(r.document)), origins: r.origins };
	} finally {
		FAST_PATH.enabled = true;
	}
}

describe('the document body made on first read', () => {
	it('reads the same through the property, a spread, JSON and a structured clone', () => {
		const r = importQasm(MIXED, { file: 'mixed.qasm' });
		const reference = tokenPathImport(MIXED);
		expect(Object.keys(r.document)).toEqual(['format', 'version', 'title', 'registers', 'body', 'blocks']);
		const body = r.document.body;
		expect(r.document.body).toBe(body); // made once
		expect(body.length).toBe(reference.document.body.length);
		expect(JSON.parse(JSON.stringify(r.document))).toEqual(reference.document);
		expect(JSON.stringify(r.document)).toBe(JSON.stringify(reference.document));
		expect(JSON.parse(JSON.stringify({ ...r.document }))).toEqual(reference.document);
		// Worker messages and the heavy pool copy documents by structured clone.
		expect(JSON.parse(JSON.stringify(structuredClone(r.document)))).toEqual(reference.document);
		// The recogniser rewrote the CNOT-written phases, and the broadcast is one call item.
		expect(r.decompositions?.regions).toBeGreaterThan(0);
		expect(body.some((i) => i.type === 'call')).toBe(true);
	});

	it('origins read before the body point at the same lines as the items made later', () => {
		const r = importQasm(MIXED, { file: 'mixed.qasm' });
		const origins = r.origins;
		const body = r.document.body;
		expect(origins.length).toBe(body.length);
		for (let i = 0; i < body.length; i++) expect(origins[i].call).toEqual(body[i].source);
		const reference = tokenPathImport(MIXED);
		expect(JSON.stringify(origins)).toBe(JSON.stringify(reference.origins));
	});

	it('a body assigned replaces the one made on read', () => {
		const r = importQasm(MIXED, { file: 'mixed.qasm' });
		const first = r.document.body[0];
		r.document.body = [first];
		expect(r.document.body).toEqual([first]);
		expect(JSON.parse(JSON.stringify(r.document)).body).toHaveLength(1);
	});

	it('a large exporter-style file: items made late equal items made at once', () => {
		const lines = ['OPENQASM 2.0;', 'include "qelib1.inc";', 'qreg q[6];'];
		for (let g = 0; g < 3000; g++) lines.push(g % 3 === 0 ? `cx q[${g % 6}],q[${(g + 1) % 6}];` : g % 3 === 1 ? `u1(0.785398) q[${g % 5}];` : `h q[${g % 4}];`);
		const text = lines.join('\n');
		const r = importQasm(text, { file: 'mixed.qasm' });
		expect(JSON.stringify(r.document)).toBe(JSON.stringify(tokenPathImport(text).document));
	});
});
