import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { TrackCsvReader, parseTrackCsv } from '@/domain/tracks/csv';

const cols = { time: 't', x: 'x', y: 'y', z: 'z' };
const bytes = (s: string) => new TextEncoder().encode(s);

describe('track CSV parser', () => {
  it('reads the mapped columns in any order and skips the others', () => {
    const r = parseTrackCsv(bytes('z,label,t,x,y,extra\n0.5,a,1,2,3,zz\n-1e-3,b,2,+4.25,6E2,\n'), cols);
    expect(Array.from(r.t)).toEqual([1, 2]);
    expect(Array.from(r.x)).toEqual([2, 4.25]);
    expect(Array.from(r.y)).toEqual([3, 600]);
    expect(Array.from(r.z)).toEqual([0.5, -0.001]);
    expect(r.rows).toBe(2);
    expect(r.droppedRows).toBe(0);
  });

  it('counts rows with blank or non-numeric mapped cells as dropouts', () => {
    const r = parseTrackCsv(bytes('t,x,y,z\n0,1,1,1\n1,,1,1\n2,NaN,1,1\n3,1,1,1x\n4,1,1,1\n'), cols);
    expect(Array.from(r.t)).toEqual([0, 4]);
    expect(r.droppedRows).toBe(3);
  });

  it('handles a byte-order mark, CRLF line ends, blank lines, quotes and spaces', () => {
    const r = parseTrackCsv(bytes('\uFEFF"t", "x" ,y,z\r\n\r\n 1 ,"2.5",3,4\r\n\n5,6,7,8 \r\n'), cols);
    expect(Array.from(r.t)).toEqual([1, 5]);
    expect(Array.from(r.x)).toEqual([2.5, 6]);
    expect(Array.from(r.z)).toEqual([4, 8]);
  });

  it('accepts semicolons with decimal commas and tabs', () => {
    const semi = parseTrackCsv(bytes('t;x;y;z\n0,5;1,25;2;3\n'), cols);
    expect(semi.delimiter).toBe(';');
    expect(Array.from(semi.t)).toEqual([0.5]);
    expect(Array.from(semi.x)).toEqual([1.25]);
    const tab = parseTrackCsv(bytes('t\tx\ty\tz\n1\t\t3\t4\n1.5\t2\t3\t4'), cols);
    expect(Array.from(tab.t)).toEqual([1.5]);
    expect(tab.droppedRows).toBe(1);
  });

  it('scales to SI units while reading', () => {
    const r = parseTrackCsv(bytes('t,x,y,z\n250,100,200,300\n'), cols, { timeScale: 0.001, lengthScale: 0.001 });
    expect(r.t[0]).toBeCloseTo(0.25, 15);
    expect(r.z[0]).toBeCloseTo(0.3, 15);
  });

  it('names the field of a column that is not in the header', () => {
    expect(() => parseTrackCsv(bytes('t,x,y,height\n1,2,3,4\n'), cols)).toThrow(/z: column 'z' is not in the CSV header/);
    expect(() => parseTrackCsv(bytes('t,x,y,z\n'), { ...cols, y: 'x' })).toThrow(/already mapped/);
    expect(() => parseTrackCsv(bytes(''), cols)).toThrow(/empty/);
  });

  it('reads every double exactly as Number() does, in plain, fixed and exponent notation', () => {
    fc.assert(
      fc.property(
        fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e30, max: 1e30 }),
        fc.integer({ min: 0, max: 12 }),
        fc.constantFrom('plain', 'fixed', 'exp'),
        (v, digits, style) => {
          const text = style === 'plain' ? String(v) : style === 'fixed' ? v.toFixed(digits) : v.toExponential(digits);
          const r = parseTrackCsv(bytes(`t,x,y,z\n${text},${text},0,0\n`), cols);
          expect(r.t[0]).toBe(Number(text));
        },
      ),
      { numRuns: 2000, seed: 20260301 },
    );
  });

  it('reads the same samples whatever the chunk boundaries', () => {
    const text = '\uFEFFt;x;y;z\r\n0,5;1;2;3\r\n\r\n1;"2";3;4\n2;;3;4\n3;1e-3;-2;+7,25\n4;5;6;7';
    const whole = parseTrackCsv(bytes(text), cols);
    expect(whole.length).toBe(4);
    fc.assert(
      fc.property(fc.uniqueArray(fc.integer({ min: 1, max: bytes(text).length - 1 }), { maxLength: 6 }), (cuts) => {
        const all = bytes(text);
        const points = [0, ...cuts.sort((a, b) => a - b), all.length];
        const reader = new TrackCsvReader(cols);
        for (let k = 0; k + 1 < points.length; k++) reader.push(all.subarray(points[k], points[k + 1]));
        const r = reader.finish();
        expect(Array.from(r.t)).toEqual(Array.from(whole.t));
        expect(Array.from(r.x)).toEqual(Array.from(whole.x));
        expect(Array.from(r.z)).toEqual(Array.from(whole.z));
        expect(r.droppedRows).toBe(whole.droppedRows);
      }),
      { numRuns: 300, seed: 20260302 },
    );
  });

  it('copies an unfinished line, so the caller may reuse its chunk buffer', () => {
    const all = bytes('t,x,y,z\n' + Array.from({ length: 40 }, (_, k) => `${k},1.5,2.5,${k}.25`).join('\n') + '\n');
    const reused = Buffer.alloc(7);
    const reader = new TrackCsvReader(cols);
    for (let at = 0; at < all.length; at += reused.length) {
      const piece = all.subarray(at, at + reused.length);
      reused.set(piece);
      reader.push(reused.subarray(0, piece.length));
      reused.fill(57); // scribble over the buffer as the next read would
    }
    const r = reader.finish();
    expect(r.length).toBe(40);
    expect(r.droppedRows).toBe(0);
    expect(Array.from(r.z).slice(0, 3)).toEqual([0.25, 1.25, 2.25]);
  });

  it('grows its arrays past the first estimate', () => {
    const reader = new TrackCsvReader(cols);
    reader.push(bytes('t,x,y,z\n'));
    for (let k = 0; k < 50; k++) reader.push(bytes(`${k},0,0,${k / 10}\n`));
    const r = reader.finish();
    expect(r.length).toBe(50);
    expect(r.z[49]).toBeCloseTo(4.9, 12);
  });
});

