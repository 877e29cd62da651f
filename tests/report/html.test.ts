import { describe, expect, it } from 'vitest';
import { buildHtmlReport, escapeHtml } from '../../src/report/html.js';
import { renderLinePlotSvg } from '../../src/report/plots.js';

const HOSTILE = `<img src=x onerror="alert('pwned')">&amp;"quoted"</title><script>alert(1)</script>`;

describe('escapeHtml (HTML Living Standard: & < > " \' are the characters to escape in text and attributes)', () => {
  it('escapes every special character', () => {
    expect(escapeHtml(`a & b < c > d "e" 'f'`)).toBe('a &amp; b &lt; c &gt; d &quot;e&quot; &#39;f&#39;');
  });

  it('escapes & first, so existing entities are shown literally', () => {
    expect(escapeHtml('&lt;')).toBe('&amp;lt;');
  });
});

describe('buildHtmlReport', () => {
  it('keeps a hostile file name inert everywhere it appears', async () => {
    const svg = await renderLinePlotSvg({
      title: HOSTILE,
      xLabel: 'x',
      yLabel: 'y',
      series: [{ name: HOSTILE, points: [{ x: 1, y: 1 }, { x: 2, y: 3 }] }],
    });
    const html = buildHtmlReport({
      title: `Analysis of ${HOSTILE}`,
      subtitle: HOSTILE,
      sections: [
        {
          heading: HOSTILE,
          paragraphs: [HOSTILE],
          tables: [{ columns: ['Name', HOSTILE], rows: [[HOSTILE, '1.0']], numericColumns: [1] }],
          figures: [{ svg, caption: HOSTILE }],
        },
      ],
      footer: HOSTILE,
    });
    expect(html).not.toMatch(/<script/i);
    expect(html).not.toMatch(/<img/i);
    expect(html).not.toContain('</title><');
    expect(html).toContain('&lt;img src=x onerror=&quot;alert(&#39;pwned&#39;)&quot;&gt;');
    expect(html.match(/<title>/g)).toHaveLength(1);
  });

  it('is self-contained: no external resources, no scripts', async () => {
    const svg = await renderLinePlotSvg({ title: 't', xLabel: 'x', yLabel: 'y', series: [{ name: 's', points: [{ x: 1, y: 1 }, { x: 2, y: 2 }] }] });
    const html = buildHtmlReport({ title: 'Report', sections: [{ heading: 'Plot', figures: [{ svg }] }] });
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html).not.toMatch(/<script|<link|@import|src="http|href="http|url\(http/i);
    expect(html).toContain('<svg');
  });

  it('refuses figure markup that is not plain SVG', () => {
    expect(() => buildHtmlReport({ title: 'x', sections: [{ heading: 'h', figures: [{ svg: '<svg onload="x()"></svg>' }] }] })).toThrow();
    expect(() => buildHtmlReport({ title: 'x', sections: [{ heading: 'h', figures: [{ svg: '<div></div>' }] }] })).toThrow();
  });
});
