import { describe, expect, it } from 'vitest';
import { parsePastedTrace } from '@/utils/pasted-trace';

describe('parsePastedTrace', () => {
  it('when readings are tab-, comma- or space-separated with a header, then every reading is read', () => {
    const r = parsePastedTrace('time_s\tA340\n0\t1.2\n10,1.19\n20  1.18\n\n30;1.17e0');
    expect(r.error).toBeNull();
    expect(r.points).toEqual([
      { t: 0, a: 1.2 },
      { t: 10, a: 1.19 },
      { t: 20, a: 1.18 },
      { t: 30, a: 1.17 },
    ]);
  });

  it('when a cell is not a number, then the error names the line and the column', () => {
    const r = parsePastedTrace('0\t1.2\n10\t1,19x', 'Total trace');
    expect(r.points).toBeNull();
    expect(r.error).toBe('Total trace, line 2: expected two values (time in s, absorbance), found 3');
    const r2 = parsePastedTrace('0\t1.2\n10\tabc', 'Total trace');
    expect(r2.error).toBe('Total trace, line 2, absorbance: "abc" is not a number');
  });

  it('when nothing but blank lines is pasted, then it says there are no readings', () => {
    expect(parsePastedTrace('\n  \n').error).toBe('trace: no readings pasted');
  });
});
