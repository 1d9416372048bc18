import { describe, expect, it } from 'vitest';
import { axisTooltip, escapeHtml, tooltipHtml } from '../../../src/components/charts/tooltip';

describe('escapeHtml', () => {
  it('turns markup characters into entities when a name holds them', () => {
    expect(escapeHtml('<b>x</b>')).toBe('&lt;b&gt;x&lt;/b&gt;');
    expect(escapeHtml(`Tom & "Jo" O'Neil`)).toBe('Tom &amp; &quot;Jo&quot; O&#39;Neil');
    expect(escapeHtml('<img src=x onerror=alert(1)>')).toBe('&lt;img src=x onerror=alert(1)&gt;');
  });

  it('writes nothing for a missing value and text for numbers', () => {
    expect(escapeHtml(undefined)).toBe('');
    expect(escapeHtml(null)).toBe('');
    expect(escapeHtml(12.5)).toBe('12.5');
  });
});

describe('tooltipHtml', () => {
  it('escapes every line and joins them with line breaks when a tooltip shows a name', () => {
    expect(tooltipHtml('<b>x</b>', '61.1 mph at 34.0°')).toBe('&lt;b&gt;x&lt;/b&gt;<br/>61.1 mph at 34.0°');
  });

  it('leaves out empty lines', () => {
    expect(tooltipHtml('a', null, undefined, '', false, 'b')).toBe('a<br/>b');
  });
});

describe('axisTooltip', () => {
  it('escapes series names and the axis label but keeps ECharts’ colour marker when the pointer is over several series', () => {
    const format = axisTooltip((v) => `${Number(v).toFixed(1)} ft`, (x) => `${x} s`);
    const marker = '<span style="background-color:#D97706;"></span>';
    const html = format([
      { seriesName: '<i>Isla</i>', value: [0.5, 12.34], marker, axisValueLabel: '0.5' },
      { seriesName: 'What-if', value: 3, marker, axisValueLabel: '0.5' },
    ]);
    expect(html).toBe(`0.5 s<br/>${marker}&lt;i&gt;Isla&lt;/i&gt;: 12.3 ft<br/>${marker}What-if: 3.0 ft`);
  });

  it('writes nothing when no series is under the pointer', () => {
    expect(axisTooltip(String)([])).toBe('');
  });
});
