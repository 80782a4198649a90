/**
 * Roles, from least to most trusted. Each role may do everything the ones below it may:
 *   viewer   reads campaigns, designs, schedules, trials and analyses
 *   operator also logs trials at the rig (start, finish, one-call log, amend, track upload)
 *   planner  also creates campaigns, designs, schedules, analyses, proposals and imports
 *   admin    everything, including accounts and API tokens
 * Pure: shared by the server (route checks) and the pages (hiding actions a role may not do).
 */
export const ROLES = ['viewer', 'operator', 'planner', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}

/** True when `role` is at least `needed`. */
export function roleAtLeast(role: Role, needed: Role): boolean {
  return ROLES.indexOf(role) >= ROLES.indexOf(needed);
}

/** What the pages ask before showing an action. */
export const ACTIONS = {
  logTrials: 'operator',
  plan: 'planner',
  createCampaign: 'planner',
  administer: 'admin',
} as const satisfies Record<string, Role>;

export type Action = keyof typeof ACTIONS;

export function may(role: Role | null | undefined, action: Action): boolean {
  return !!role && roleAtLeast(role, ACTIONS[action]);
}
