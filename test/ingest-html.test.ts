import { describe, expect, it } from 'vitest';
import { capTitle, firstLine, htmlToText, readMarkdown, readPlainText, TITLE_MAX } from '../src/ingest/index.js';
import { markdownHeading } from '../src/ingest/text.js';

describe('HTML to text', () => {
  it('drops scripts, styles, templates and comments, breaks lines at blocks, decodes entities', () => {
    const html = `<!DOCTYPE html>
<html><head><title>  Quarterly
  report </title><style>p { color: red }</style><script>var x = "<p>not text</p>";</script></head>
<body>
<!-- a comment -->
<h1>Sales &amp; returns</h1>
<p>Revenue rose&nbsp;4&#37; in <b>Q3</b>,
   driven by   <i>exports</i>.</p>
<noscript>Enable JavaScript</noscript>
<template><p>hidden</p></template>
<ul><li>North: &euro;1.2m</li><li>South: &lt;1m</li></ul>
<p>Line one<br>Line two</p>
<table><tr><th>Region</th><th>Share</th></tr><tr><td>North</td><td>60%</td></tr></table>
<p><img src="chart.png" alt="Bar chart of sales"> <img src="spacer.gif" alt=""></p>
<pre>  keep   this
    indent</pre>
<svg><title>icon</title><text>svg text</text></svg>
</body></html>`;
    const r = htmlToText(html);
    expect(r.text).toBe(
      [
        'Sales & returns',
        'Revenue rose 4% in Q3, driven by exports.',
        'North: €1.2m',
        'South: <1m',
        'Line one',
        'Line two',
        'Region Share',
        'North 60%',
        'Bar chart of sales',
        'keep   this',
        'indent',
      ].join('\n'),
    );
    expect(r.title).toBe('Quarterly report');
  });

  it('takes the first <h1> when there is no <title>, else the first line', () => {
    expect(htmlToText('<p>intro</p><h1>The <em>real</em> heading</h1><h1>second</h1>').title).toBe('The real heading');
    expect(htmlToText('<div>\n  first   line </div><p>more</p>').title).toBe('first line');
    expect(htmlToText('<script>only()</script>')).toEqual({ text: '', title: '' });
  });

  it('keeps text when tags are left open or mis-nested', () => {
    expect(htmlToText('<p>one<p>two<div>three</p>four').text).toBe('one\ntwo\nthree\nfour');
  });
});

describe('Markdown and plain text', () => {
  it('takes the first ATX or setext heading outside code fences', () => {
    expect(markdownHeading('```\n# not a heading\n```\nintro\n\n## Real **one** ##\n')).toBe('Real one');
    expect(markdownHeading('Setext title\n===\n\n# later')).toBe('Setext title');
    expect(markdownHeading('#hashtag is not a heading\n')).toBe('');
  });

  it('drops front matter (its title wins) and keeps link and image text without targets', () => {
    const md = '---\ntitle: "From the front"\ntags: [a, b]\n---\n# Heading\n\nSee [the docs](https://example.org/x "t") and ![a cat](cat.png).\r\n';
    expect(readMarkdown(md)).toEqual({ text: '# Heading\n\nSee the docs and a cat.', title: 'From the front' });
    expect(readMarkdown('plain first line\n\n# Heading').title).toBe('Heading');
    expect(readMarkdown('no heading here\nat all').title).toBe('no heading here');
  });

  it('plain text: line endings normalised, trimmed, first non-empty line as title', () => {
    expect(readPlainText('\r\n  \r\n  Hello\tworld  \r\nsecond\rthird\n\n')).toEqual({
      text: 'Hello\tworld  \nsecond\nthird',
      title: 'Hello world',
    });
    expect(firstLine('\n\u00a0\n x ')).toBe('x');
  });

  it('caps long titles at a word, within the limit, with an ellipsis', () => {
    const words = Array.from({ length: 40 }, (_, i) => `word${i}`).join(' ');
    const t = capTitle(words);
    expect(Array.from(t).length).toBeLessThanOrEqual(TITLE_MAX + 1);
    expect(t.endsWith('…')).toBe(true);
    expect(words.startsWith(t.slice(0, -1))).toBe(true);
    expect(words[t.length - 1]).toBe(' '); // cut where a word ended
    const one = 'x'.repeat(300);
    expect(capTitle(one)).toBe('x'.repeat(TITLE_MAX) + '…');
    // Code points, not UTF-16 units: an astral character is never split.
    expect(capTitle('😀'.repeat(130))).toBe('😀'.repeat(TITLE_MAX) + '…');
  });
});
