// Entry of one pool thread (piscina loads the bundle built from this file: see pool.ts). It runs
// one task at a time and answers with data only: a value, or a refusal the web process turns
// back into the same HTTP error. Anything else thrown is a bug and travels as an Error.
import { parentPort } from 'node:worker_threads';
import { isHttpError } from '@sveltejs/kit';
import { tasks, type TaskName } from './tasks';
import { STARTED, type TaskReply, type TaskRequest } from './protocol';

export default function run(req: TaskRequest): TaskReply {
	// Tell the web process this task has left the queue: its time limit counts from here.
	parentPort?.postMessage({ [STARTED]: req.id });
	const fn = tasks[req.task as TaskName] as ((args: unknown) => unknown) | undefined;
	if (!fn) return { ok: false, status: 500, message: `no such pool task: ${req.task}`, code: 'internal' };
	try {
		return { ok: true, value: fn(req.args) };
	} catch (e) {
		if (isHttpError(e)) {
			const body = e.body as { message: string; code?: string };
			return { ok: false, status: e.status, message: body.message, code: body.code ?? 'bad_request' };
		}
		throw e;
	}
}
