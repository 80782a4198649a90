/**
 * Week planner: rig calendars, the run-to-rig solver, bounds, and exports.
 */
export type * from './types';
export { planSchedule } from './plan';
export { workingAvailability, type RigCalendar } from './calendar';
export { wallTimeToUtc, zoneOffsetMs, dayInZone, clockInZone, isoWeekday, addCalendarDays } from './time-zone';
export { replan, type ScheduleEvent } from './replan';
