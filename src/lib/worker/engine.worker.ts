/// <reference lib="webworker" />
// The workbench's engine worker: all lowering and simulation happen here, off the page's thread.
import { beginLoad, handleRequest, type EngineSession } from './engine';
import type { WorkerRequest, WorkerResponse } from './protocol';

/** Longest a load waits for the page to draw its step 0 before computing the run anyway. */
const MAX_PREVIEW_WAIT_MS = 1500;

let session: EngineSession | null = null;
/**
 * A load whose step 0 went to the page: its run is computed when the page says it drew it (on a
 * machine with few cores the page then does not share the CPU with the run), when another
 * request comes (answers stay in order), or after MAX_PREVIEW_WAIT_MS.
 */
let waiting: { finish: () => ReturnType<typeof handleRequest>; timer: ReturnType<typeof setTimeout> } | null = null;

const post = (m: WorkerResponse) => (self as unknown as Worker).postMessage(m);

function finishWaiting(): void {
	if (!waiting) return;
	const w = waiting;
	waiting = null;
	clearTimeout(w.timer);
	const out = w.finish();
	session = out.session;
	post(out.response);
}

self.onmessage = (e: MessageEvent<WorkerRequest>) => {
	const req = e.data;
	finishWaiting();
	if (req.type === 'drawn') return;
	const id = req.id;
	if (req.type === 'load' && req.preview) {
		const begun = beginLoad(req, (frame) => post({ id, type: 'preview', frame }));
		if (begun.previewed) {
			waiting = { finish: begun.finish, timer: setTimeout(finishWaiting, MAX_PREVIEW_WAIT_MS) };
			return;
		}
		const out = begun.finish();
		session = out.session;
		return post(out.response);
	}
	const out = handleRequest(session, req, (done, total) => post({ id, type: 'progress', done, total }));
	session = out.session;
	post(out.response);
};
