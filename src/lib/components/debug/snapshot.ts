// Capture the current frame as a PNG: the workbench's frame area (dial board canvas and qubit
// table) under a header naming circuit, version, step and inputs. Browser only; html-to-image is
// imported when first used so server rendering never loads it.
import type { WorkbenchContext } from '$lib/components/workbench/context';

export type SnapshotHeader = { circuit: string; version: number; step: number; lastStep: number; inputs: string };

const HEADER_PX = 58;

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
	ctx.scene?.render();
	const body = await toCanvas(area, { pixelRatio: 1, backgroundColor: '#f6f1e7', skipFonts: true });
	const out = document.createElement('canvas');
	out.width = Math.max(body.width, 480);
	out.height = body.height + HEADER_PX;
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
	return new Promise((resolve, reject) => out.toBlob((b) => (b ? resolve(b) : reject(new Error('The snapshot could not be encoded as PNG.'))), 'image/png'));
}
