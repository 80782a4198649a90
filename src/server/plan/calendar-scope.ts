/**
 * Scope the UIDs of a generated iCalendar file to one campaign, so the same rig's calendars of two
 * campaigns (both with a "run 12") can be imported side by side without one event replacing another.
 * RFC 5545 §3.1: content lines are folded after at most 75 octets with CRLF + one space.
 */
const FOLD_OCTETS = 75;

/** Fold one content line into pieces of at most 75 octets (never splitting a UTF-8 character). */
export function foldLine(line: string): string {
  const encoder = new TextEncoder();
  const parts: string[] = [];
  let current = '';
  let octets = 0;
  for (const ch of line) {
    const size = encoder.encode(ch).length;
    // Continuation lines start with a space, which counts towards their 75 octets.
    const limit = parts.length === 0 ? FOLD_OCTETS : FOLD_OCTETS - 1;
    if (octets + size > limit) {
      parts.push(current);
      current = '';
      octets = 0;
    }
    current += ch;
    octets += size;
  }
  parts.push(current);
  return parts.join('\r\n ');
}

/** Unfold the file, append `scope` to the local part of every UID (before its "@"), fold again. */
export function scopeCalendarUids(ics: string, scope: string): string {
  const safe = scope.replace(/[^A-Za-z0-9_-]/g, '');
  const lines = ics.replace(/\r\n[ \t]/g, '').split('\r\n');
  return lines
    .map((line) => {
      const m = /^UID:([^@]*)(@.*)?$/.exec(line);
      return foldLine(m ? `UID:${m[1]}-${safe}${m[2] ?? ''}` : line);
    })
    .join('\r\n');
}
