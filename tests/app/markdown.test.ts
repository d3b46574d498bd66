// The documentation renderer: CommonMark's basic constructs as the project's own pages use
// them (headings, code, lists, tables, quotes, inline code, emphasis and links), and no
// markup from the text itself (escaping as HTML requires: &, <, > and quotes).
import { describe, expect, it } from 'vitest';
import { FIELD_HELP, helpFor, slug } from '../../src/app/help.ts';
import { escapeHtml, renderMarkdown } from '../../src/app/markdown.ts';
import { readFileSync } from 'node:fs';

describe('documentation pages', () => {
  it('renders the constructs of the project pages', () => {
    const html = renderMarkdown(
      ['## The `target`: one of', '', 'A *robust* pulse, **exact**; see [spec](docs/spec.md#top-level).', '', '- one', '- two', '', '1. first', '', '| a | b |', '| --- | --- |', '| 1 | `x` |', '', '```ts', 'const a = 1 < 2;', '```', '', '> **Safety.** Check.', '', '    npm test'].join('\n'),
    );
    expect(html).toContain('<h2 id="the-target-one-of">The <code>target</code>: one of</h2>');
    expect(html).toContain('<p>A <em>robust</em> pulse, <strong>exact</strong>; see <a href="docs/spec.md#top-level">spec</a>.</p>');
    expect(html).toContain('<ul><li>one</li><li>two</li></ul>');
    expect(html).toContain('<ol><li>first</li></ol>');
    expect(html).toContain('<table><thead><tr><th>a</th><th>b</th></tr></thead><tbody><tr><td>1</td><td><code>x</code></td></tr></tbody></table>');
    expect(html).toContain('<pre><code>const a = 1 &lt; 2;</code></pre>');
    expect(html).toContain('<blockquote><p><strong>Safety.</strong> Check.</p></blockquote>');
    expect(html).toContain('<pre><code>npm test</code></pre>');
  });

  it('writes no markup of the text itself', () => {
    expect(escapeHtml('<img src=x onerror="y">&')).toBe('&lt;img src=x onerror=&quot;y&quot;&gt;&amp;');
    expect(renderMarkdown('<script>alert(1)</script>')).toBe('<p>&lt;script&gt;alert(1)&lt;/script&gt;</p>');
  });

  it('points every field at a heading that exists in its page', () => {
    const pages = { readme: 'README.md', spec: 'docs/spec.md', analysis: 'docs/analysis.md', physics: 'docs/physics.md' };
    const anchors = Object.fromEntries(
      Object.entries(pages).map(([k, file]) => [k, new Set([...readFileSync(file, 'utf8').matchAll(/^#{1,6} (.*)$/gm)].map((m) => slug(m[1])))]),
    );
    for (const [key, help] of Object.entries(FIELD_HELP)) {
      expect(anchors[help.doc.page].has(slug(help.doc.heading)), `${key}: "${help.doc.heading}" in ${help.doc.page}`).toBe(true);
      expect(help.unit.length, key).toBeGreaterThan(0);
      expect(help.typical.length, key).toBeGreaterThan(0);
    }
    expect(helpFor({ id: 'open-BB1' })?.label).toBe('Open in');
    expect(helpFor({ id: '', name: 'b-show' })?.label).toBe('Members shown');
  });
});
