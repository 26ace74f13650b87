// Report statuses, severities and the allowed status changes. Pure: pages use it to offer only
// the moves the server will accept, the server uses it to refuse the rest.

export const REPORT_STATUSES = ['open', 'confirmed', 'fixed', 'verified', 'wont_fix'] as const;
export type ReportStatus = (typeof REPORT_STATUSES)[number];

export const SEVERITIES = ['low', 'medium', 'high', 'critical'] as const;
export type Severity = (typeof SEVERITIES)[number];

export const STATUS_LABEL: Record<ReportStatus, string> = {
	open: 'Open',
	confirmed: 'Confirmed',
	fixed: 'Fixed',
	verified: 'Verified',
	wont_fix: "Won't fix"
};

/** A mark beside each status so colour is never the only cue. */
export const STATUS_MARK: Record<ReportStatus, string> = { open: '○', confirmed: '◐', fixed: '●', verified: '✓', wont_fix: '—' };

export const SEVERITY_LABEL: Record<Severity, string> = { low: 'Low', medium: 'Medium', high: 'High', critical: 'Critical' };

/**
 * Where a report may go from each status. Forward along open → confirmed → fixed → verified;
 * a fix that does not hold goes back to confirmed; won't fix can be reopened.
 */
export const STATUS_MOVES: Record<ReportStatus, readonly ReportStatus[]> = {
	open: ['confirmed', 'wont_fix'],
	confirmed: ['fixed', 'wont_fix', 'open'],
	fixed: ['verified', 'confirmed'],
	verified: ['confirmed'],
	wont_fix: ['open']
};

export function canMove(from: ReportStatus, to: ReportStatus): boolean {
	return STATUS_MOVES[from].includes(to);
}

export function isStatus(v: unknown): v is ReportStatus {
	return typeof v === 'string' && (REPORT_STATUSES as readonly string[]).includes(v);
}
