/**
 * Week planner: rig calendars, the run-to-rig solver, bounds, and exports.
 */
export type * from './types';
export { planSchedule } from './plan';
export { workingAvailability, type RigCalendar } from './calendar';
export { wallTimeToUtc, zoneOffsetMs, dayInZone, clockInZone, isoWeekday, addCalendarDays } from './time-zone';
export { replan, type ScheduleEvent } from './replan';
export { validateManualMove, RANDOMISATION_RESTRICTION_MESSAGE, type ManualMove, type MoveCheck, type MoveProblemCode } from './manual-move';
export { dayAvailability, daySheet, weekGrid, rigCalendar, type DaySheet, type SheetRow, type WeekGrid, type RigCalendarOptions } from './export';
