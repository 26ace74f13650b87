// Small wording helpers shared by pages and the command line.

/** "1 gate", "2 gates": a count with its noun in the right number (`many` for irregular plurals). */
export function plural(n: number | string, one: string, many = `${one}s`): string {
	return `${n} ${Number(String(n).replace(/\s/g, '')) === 1 ? one : many}`;
}
