import { describe, expect, it } from 'vitest';
import { ACTIONS, atLeast, can, grantableTokenRoles, minRole, ROLES, type Action, type Role } from './permissions';

// The product's role table (docs: /work/shared/DESIGN.md, "role | circuits | traces, breakpoints |
// reports | members"), written out cell by cell so a change to permissions.ts must change this too.
const TABLE: Record<Role, Action[]> = {
	owner: [
		'team.view', 'members.view', 'members.manage', 'circuit.view', 'circuit.edit', 'check.view', 'check.run', 'check.cancel', 'trace.replay', 'trace.create', 'trace.delete',
		'breakpoint.create', 'breakpoint.delete', 'breakpoint.annotate', 'report.view', 'report.create', 'report.edit', 'report.comment',
		'report.status', 'report.delete', 'token.create', 'token.revoke_any'
	],
	engineer: [
		'team.view', 'members.view', 'circuit.view', 'circuit.edit', 'check.view', 'check.run', 'check.cancel', 'trace.replay', 'trace.create', 'breakpoint.create',
		'breakpoint.annotate', 'report.view', 'report.create', 'report.edit', 'report.comment', 'report.status', 'token.create'
	],
	reviewer: ['team.view', 'members.view', 'circuit.view', 'check.view', 'trace.replay', 'breakpoint.annotate', 'report.view', 'report.comment', 'report.status', 'token.create'],
	viewer: ['team.view', 'members.view', 'circuit.view', 'check.view', 'trace.replay', 'report.view']
};

describe('permissions', () => {
	it('match the role table in every cell', () => {
		for (const role of ROLES) for (const action of ACTIONS) expect([role, action, can(role, action)]).toEqual([role, action, TABLE[role].includes(action)]);
	});

	it('refuse everything without a role', () => {
		for (const action of ACTIONS) expect(can(null, action)).toBe(false);
	});

	it('order roles owner > engineer > reviewer > viewer', () => {
		expect(atLeast('owner', 'engineer')).toBe(true);
		expect(atLeast('reviewer', 'engineer')).toBe(false);
		expect(minRole('owner', 'reviewer')).toBe('reviewer');
		expect(minRole('viewer', 'engineer')).toBe('viewer');
	});

	it('let a token creator grant only roles up to their own', () => {
		expect(grantableTokenRoles('engineer')).toEqual(['engineer', 'reviewer', 'viewer']);
		expect(grantableTokenRoles('viewer')).toEqual(['viewer']);
	});
});
