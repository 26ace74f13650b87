// What the web process and a pool thread send each other (plain data: structured clone).

/** Key of the message a thread posts when it starts a task (the value is the task's id). */
export const STARTED = 'orreryHeavyStarted';

export type TaskRequest = { id: number; task: string; args: unknown };

export type TaskReply = { ok: true; value: unknown } | { ok: false; status: number; message: string; code: string };
