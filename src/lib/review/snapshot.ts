// Capture the current frame as a PNG: the workbench's frame area (dial board canvas and qubit
// table) under a header naming circuit, version, step and inputs, with the angle ledger below. Browser only; html-to-image is
// imported when first used so server rendering never loads it.
import type { WorkbenchContext } from '$lib/state/workbench-context';

export type SnapshotHeader = { circuit: string; version: number; step: number; lastStep: number; inputs: string };

const HEADER_PX = 58;
const LEDGER_ROWS = 12;
const LEDGER_ROW_PX = 17;

export function describeInputs(inputs: { values: Record<string, string>; superposed: string[] }): string {
	const parts = Object.entries(inputs.values).map(([k, v]) => `${k}=${v || '0'}`);
	for (const s of inputs.superposed) parts.push(`${s}=all values`);
	return parts.join(', ') || 'all registers 0';
}

/** PNG bytes of the frame with its header. The pixi canvas keeps its drawing buffer; render it once more right before the copy. */
export async function captureFrame(ctx: WorkbenchContext, header: SnapshotHeader): Promise<Blob> {
	const area = ctx.frameArea;
	if (!area) throw new Error('Nothing to capture yet: the frame has not been drawn.');
	const { toCanvas } = await import('html-to-image');
	// The ledger goes into the picture too: of the selected qubit, else of the first diverged one.
	const diverged = ctx.run.frame?.diverged ?? [];
	if (ctx.run.selectedQubit === null && diverged.length) await ctx.run.select(diverged[0]);
	const ledger = ctx.run.ledger;
	const rows = ledger ? ledger.rows.filter((r) => r.step <= header.step).slice(-LEDGER_ROWS) : [];
	ctx.scene?.render();
	const body = await toCanvas(area, { pixelRatio: 1, backgroundColor: '#f6f1e7', skipFonts: true });
	const ledgerPx = ledger ? 30 + LEDGER_ROW_PX * Math.max(1, rows.length) : 0;
	const out = document.createElement('canvas');
	out.width = Math.max(body.width, 640);
	out.height = body.height + HEADER_PX + ledgerPx;
	const g = out.getContext('2d');
	if (!g) throw new Error('This browser cannot draw the snapshot (no 2D canvas).');
	g.fillStyle = '#ece4d4'; // paper.deep
	g.fillRect(0, 0, out.width, HEADER_PX);
	g.fillStyle = '#1d2330'; // ink
	g.font = '600 15px system-ui, sans-serif';
	g.fillText(`${header.circuit} · v${header.version} · step ${header.step} / ${header.lastStep}`, 12, 22);
	g.font = '13px ui-monospace, monospace';
	g.fillStyle = '#3a4254'; // ink.soft
	g.fillText(`inputs: ${header.inputs} · exact simulation, not a hardware run`, 12, 44);
	g.drawImage(body, 0, HEADER_PX);
	if (ledger) {
		let y = HEADER_PX + body.height + 20;
		g.fillStyle = '#1d2330';
		g.font = '600 13px system-ui, sans-serif';
		const parted = ledger.firstParted !== null ? ` — parts from the expected angle at step ${ledger.firstParted}` : ' — never parts from the expected angle';
		g.fillText(`Angle ledger of ${ledger.label} (turns)${parted}`, 12, y);
		g.font = '12px ui-monospace, monospace';
		if (!rows.length) g.fillText('no contribution up to this step', 12, (y += LEDGER_ROW_PX));
		for (const r of rows) {
			y += LEDGER_ROW_PX;
			g.fillStyle = r.parted ? '#8f231b' : '#3a4254'; // vermilion.dark / ink.soft
			const amount = r.amount !== null ? `+${r.amount}` : r.kind;
			g.fillText(`step ${String(r.step).padStart(4)}  ${amount.padEnd(10)} total ${(r.total ?? '—').padEnd(8)} expected ${(r.expected ?? '').padEnd(8)}${r.parted ? ' ✗' : '  '}  ${r.gateText}`, 12, y);
		}
	}
	return new Promise((resolve, reject) => out.toBlob((b) => (b ? resolve(b) : reject(new Error('The snapshot could not be encoded as PNG.'))), 'image/png'));
}
