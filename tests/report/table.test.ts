import { describe, expect, it } from 'vitest';
import { formatRows, formatTable, formatValue, MISSING_VALUE } from '../../src/report/table.js';

describe('formatTable', () => {
  it('pads columns, right-aligns numbers and draws a rule under the header', () => {
    const text = formatTable({
      columns: [{ title: 'Quantity' }, { title: 'Value', align: 'right' }],
      rows: [
        ['Peak', '-0.50 dBFS'],
        ['Integrated loudness', '-23.0 LUFS'],
      ],
    });
    expect(text).toBe(
      [
        'Quantity                  Value',
        '-------------------  ----------',
        'Peak                 -0.50 dBFS',
        'Integrated loudness  -23.0 LUFS',
        '',
      ].join('\n'),
    );
  });

  it('formats missing values as n/a', () => {
    expect(formatValue(null, 2, 'dB')).toBe(MISSING_VALUE);
    expect(formatValue(Number.NEGATIVE_INFINITY, 2)).toBe(MISSING_VALUE);
    expect(formatValue(-3.14159, 2, 'dB')).toBe('-3.14 dB');
  });
});

describe('formatRows', () => {
  it('right-aligns the columns whose cells are all numbers', () => {
    const text = formatRows(['order', 'name', 'dBc'], [
      ['2', 'second', '-20.0'],
      ['10', 'tenth', 'n/a'],
    ]);
    expect(text.split('\n')).toEqual(['order  name      dBc', '-----  ------  -----', '    2  second  -20.0', '   10  tenth     n/a', '']);
  });
});
