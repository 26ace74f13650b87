/// <reference lib="webworker" />
// The workbench's engine worker: all lowering and simulation happen here, off the page's thread.
import { handleRequest, type EngineSession } from './engine';
import type { WorkerRequest, WorkerResponse } from './protocol';

let session: EngineSession | null = null;

self.onmessage = (e: MessageEvent<WorkerRequest>) => {
	const id = e.data.id;
	const post = (m: WorkerResponse) => (self as unknown as Worker).postMessage(m);
	const out = handleRequest(
		session,
		e.data,
		(done, total) => post({ id, type: 'progress', done, total }),
		(frame) => post({ id, type: 'preview', frame })
	);
	session = out.session;
	(self as unknown as Worker).postMessage(out.response);
};
