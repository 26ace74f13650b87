// The dial board as an SVG document, built from the same model the pixi board draws
// (dial-model.ts: grouping, layout, divergence rule). Pure string building, no DOM: the server
// draws the picture a report opens with, where there is no browser. Angles in turns; a needle at
// angle t points t of a full turn clockwise from twelve o'clock, as on the live board.
import { groupByRegister, isDiverged, layoutDials, shortestTurn, visibleTickCount, type DialQubit } from './dial-model';

/** The live board's palette (dial-scene.ts), as CSS colours. */
export const DIAL_PALETTE = {
	background: '#151a24',
	panel: '#1f2533',
	ring: '#2d3546',
	tick: '#9aa0ad',
	paper: '#f6f1e7',
	needle: '#f1dccb',
	expectedLight: '#cfe6df',
	diverged: '#c2362b',
	selected: '#b8652f'
} as const;

const RADIUS = 30;
const C = DIAL_PALETTE;
const esc = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
const n2 = (x: number) => (Math.round(x * 100) / 100).toString();

/** Point at `turns` (clockwise from twelve o'clock) on a circle of radius r around (cx, cy). */
function at(cx: number, cy: number, r: number, turns: number): [number, number] {
	const a = turns * 2 * Math.PI - Math.PI / 2;
	return [cx + Math.cos(a) * r, cy + Math.sin(a) * r];
}

function dialSvg(q: DialQubit, x: number, y: number, selected: boolean): string {
	const out: string[] = [];
	const diverged = isDiverged(q);
	out.push(`<g data-qubit="${q.qubit}"${diverged ? ' data-diverged="true"' : ''}>`);
	out.push(`<circle cx="${n2(x)}" cy="${n2(y)}" r="${RADIUS + 6}" fill="${C.panel}"/>`);
	out.push(`<circle cx="${n2(x)}" cy="${n2(y)}" r="${RADIUS}" fill="none" stroke="${selected ? C.selected : C.ring}" stroke-width="${selected ? 3 : 2}"/>`);
	if (diverged) out.push(`<circle cx="${n2(x)}" cy="${n2(y)}" r="${RADIUS + 4}" fill="none" stroke="${C.diverged}" stroke-width="1.5"/>`);
	if (q.kind === 'classical') {
		const h = 12;
		if (q.bit === 1) {
			out.push(`<rect x="${n2(x - h)}" y="${n2(y - h)}" width="${2 * h}" height="${2 * h}" rx="3" fill="${C.paper}"/>`);
			out.push(`<path d="M${n2(x - 3)} ${n2(y - 4)}L${n2(x + 1)} ${n2(y - 7)}L${n2(x + 1)} ${n2(y + 7)}M${n2(x - 3)} ${n2(y + 7)}L${n2(x + 5)} ${n2(y + 7)}" fill="none" stroke="${C.panel}" stroke-width="2.2" stroke-linecap="round" stroke-linejoin="round"/>`);
		} else {
			out.push(`<rect x="${n2(x - h)}" y="${n2(y - h)}" width="${2 * h}" height="${2 * h}" rx="3" fill="none" stroke="${C.tick}" stroke-width="2"/>`);
			out.push(`<ellipse cx="${n2(x)}" cy="${n2(y)}" rx="4.5" ry="7" fill="none" stroke="${C.paper}" stroke-width="2.2"/>`);
		}
	} else {
		if (q.level !== undefined) {
			const n = visibleTickCount(q.level, RADIUS);
			const d: string[] = [];
			for (let i = 0; i < n; i++) {
				const [x0, y0] = at(x, y, i === 0 ? RADIUS - 7 : RADIUS - 4, i / n);
				const [x1, y1] = at(x, y, RADIUS, i / n);
				d.push(`M${n2(x0)} ${n2(y0)}L${n2(x1)} ${n2(y1)}`);
			}
			out.push(`<path d="${d.join('')}" stroke="${C.tick}" stroke-opacity="0.8" stroke-width="1"/>`);
		}
		const angle = q.angle ?? 0;
		if (q.expected !== undefined) {
			const [ex, ey] = at(x, y, RADIUS, q.expected);
			out.push(`<circle cx="${n2(ex)}" cy="${n2(ey)}" r="5" fill="none" stroke="${C.expectedLight}" stroke-width="2" data-role="expected"/>`);
			if (diverged) {
				// The arc from expected to actual, the short way round.
				const delta = shortestTurn(q.expected, angle);
				const [ax, ay] = at(x, y, RADIUS - 10, q.expected);
				const [bx, by] = at(x, y, RADIUS - 10, q.expected + delta);
				out.push(`<path d="M${n2(ax)} ${n2(ay)}A${RADIUS - 10} ${RADIUS - 10} 0 0 ${delta > 0 ? 1 : 0} ${n2(bx)} ${n2(by)}" fill="none" stroke="${C.diverged}" stroke-opacity="0.85" stroke-width="4"/>`);
			}
		}
		const len = (RADIUS - 5) * Math.max(0.08, Math.min(1, q.coherence ?? 1));
		const [nx, ny] = at(x, y, len, angle);
		out.push(`<line x1="${n2(x)}" y1="${n2(y)}" x2="${n2(nx)}" y2="${n2(ny)}" stroke="${diverged ? C.diverged : C.needle}" stroke-width="3" stroke-linecap="round" data-role="needle"/>`);
		out.push(`<circle cx="${n2(x)}" cy="${n2(y)}" r="3.5" fill="${C.paper}"/>`);
	}
	out.push(`<text x="${n2(x)}" y="${n2(y + RADIUS + 18)}" fill="${C.paper}" font-size="11" text-anchor="middle">${esc(`${q.register}[${q.index}]`)}</text>`);
	const sub =
		q.kind === 'classical'
			? `bit ${q.bit ?? 0}`
			: `${q.level !== undefined ? `m=${q.level} ` : ''}${q.angleText ?? (q.angle !== undefined ? q.angle.toFixed(4) : '?')}${diverged ? ' Δ' : ''}`;
	out.push(`<text x="${n2(x)}" y="${n2(y + RADIUS + 31)}" fill="${diverged ? C.diverged : C.tick}" font-size="10" text-anchor="middle">${esc(sub)}</text>`);
	out.push('</g>');
	return out.join('');
}

export interface BoardSvgOptions {
	/** Board width in px; the layout wraps dials to it (as the live board wraps to its canvas). */
	width?: number;
	/** Lines printed above the board (circuit, step, "simulation, not a hardware run"). */
	caption?: string[];
	/** A qubit drawn with the selection ring (the one the ledger excerpt is about). */
	selected?: number | null;
}

/** An SVG document of the dial board for `qubits` (flat order, index 0 = LSB of its register). */
export function renderDialBoardSvg(qubits: DialQubit[], options: BoardSvgOptions = {}): string {
	const width = options.width ?? 760;
	const caption = options.caption ?? [];
	const top = caption.length ? 14 + caption.length * 16 : 0;
	const layout = layoutDials(groupByRegister(qubits), width);
	const pos = new Map(layout.positions.map((p) => [p.qubit, p]));
	const height = Math.ceil(layout.height + top);
	const parts: string[] = [
		`<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="'JetBrains Mono', ui-monospace, monospace" role="img">`,
		`<rect width="${width}" height="${height}" fill="${C.background}"/>`
	];
	caption.forEach((line, i) => parts.push(`<text x="12" y="${20 + i * 16}" fill="${i === 0 ? C.paper : C.tick}" font-size="${i === 0 ? 13 : 11}">${esc(line)}</text>`));
	parts.push(`<g transform="translate(0 ${top})">`);
	for (const h of layout.headers) parts.push(`<text x="${h.x}" y="${h.y + 13}" fill="${C.tick}" font-size="13" font-weight="600">${esc(h.register)}</text>`);
	for (const q of qubits) {
		const p = pos.get(q.qubit);
		if (p) parts.push(dialSvg(q, p.x, p.y, options.selected === q.qubit));
	}
	parts.push('</g></svg>');
	return parts.join('\n');
}
