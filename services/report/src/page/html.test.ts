import { describe, expect, it } from 'vitest';
import { escapeHtml, html, safeSvg, trusted } from './html';
import { figure, interval, percentOfShare, samplingError } from './figures';

describe('html', () => {
  it('escapes interpolated text, keeps trusted markup, joins arrays and drops null/false', () => {
    const name = '<img src=x onerror=alert(1)> & "Ost"';
    expect(html`<td title="${name}">${name}</td>`.value).toBe(
      '<td title="&lt;img src=x onerror=alert(1)&gt; &amp; &quot;Ost&quot;">&lt;img src=x onerror=alert(1)&gt; &amp; &quot;Ost&quot;</td>',
    );
    expect(html`<ul>${['a<', 'b'].map((x) => html`<li>${x}</li>`)}${null}${false}${trusted('<hr>')}</ul>`.value).toBe('<ul><li>a&lt;</li><li>b</li><hr></ul>');
    expect(escapeHtml("it's")).toBe('it&#39;s');
  });

  it('accepts drawing SVG only', () => {
    expect(safeSvg('<svg viewBox="0 0 1 1"><rect/></svg>')?.value).toBe('<svg role="img" focusable="false" viewBox="0 0 1 1"><rect/></svg>');
    expect(safeSvg('<svg><script>alert(1)</script></svg>')).toBeNull();
    expect(safeSvg('<svg><rect onclick="x()"/></svg>')).toBeNull();
    expect(safeSvg('<svg><foreignObject/></svg>')).toBeNull();
    expect(safeSvg('<div>')).toBeNull();
    expect(safeSvg(null)).toBeNull();
  });
});

describe('figures for people', () => {
  it('round to 3 significant figures below 1000 and group thousands above', () => {
    expect(figure(21)).toBe('21');
    expect(figure(1.8027756377319946)).toBe('1.8');
    expect(figure(0.30625)).toBe('0.306');
    expect(figure(-0.019734)).toBe('-0.0197');
    expect(figure(84000)).toBe('84,000');
    expect(figure(1820000.4)).toBe('1,820,000');
    expect(figure(null)).toBe('–');
    expect(figure(Number.NaN)).toBe('–');
  });

  it('write shares, sampling errors and intervals', () => {
    expect(percentOfShare(0.375)).toBe('37.5 %');
    expect(samplingError(32.456)).toBe('±32.5 %');
    expect(interval(14.2, 27.8)).toBe('14.2 – 27.8');
    expect(interval(null, 2)).toBe('–');
  });
});
