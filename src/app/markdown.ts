// A small Markdown renderer for the documentation pages shipped with the app (our own
// README and docs/): headings with anchors, paragraphs, fenced and indented code, lists,
// quotes, tables, and inline code, emphasis and links. Every piece of text is escaped
// first, so the output holds no markup but what the renderer writes.
import { slug } from './help.ts';

/** Text with &, <, > and quotes escaped for HTML. */
export function escapeHtml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** Inline Markdown of one escaped line: code spans, links, bold, emphasis. */
function inline(text: string): string {
  const codes: string[] = [];
  let out = escapeHtml(text).replace(/`([^`]+)`/g, (_, code: string) => {
    codes.push(`<code>${code}</code>`);
    return `\uE000${codes.length - 1}\uE001`;
  });
  out = out.replace(/\[([^\]]+)\]\(([^)\s]+)\)/g, (_, label: string, href: string) => {
    const external = /^https?:/.test(href);
    return `<a href="${href}"${external ? ' target="_blank" rel="noopener noreferrer"' : ''}>${label}</a>`;
  });
  out = out.replace(/\*\*([^*]+)\*\*/g, '<strong>$1</strong>').replace(/(^|[^\w*])\*([^*\s][^*]*)\*/g, '$1<em>$2</em>');
  // Code spans stand in as private-use characters while the other rules run over the line.
  return out.replace(/\uE000(\d+)\uE001/g, (_, k: string) => codes[Number(k)]);
}

const cells = (line: string) => line.trim().replace(/^\||\|$/g, '').split('|').map((c) => c.trim());

/** HTML of a Markdown page (headings get ids from their text, as `slug` makes them). */
export function renderMarkdown(source: string): string {
  const lines = source.replace(/\r\n/g, '\n').split('\n');
  const html: string[] = [];
  let k = 0;
  const isBlockStart = (line: string) => /^(#{1,6} |```|\s*[-*] |\s*\d+\. |>|\|)/.test(line) || /^ {4}/.test(line);
  while (k < lines.length) {
    const line = lines[k];
    if (line.trim() === '') {
      k++;
      continue;
    }
    const heading = /^(#{1,6}) (.*)$/.exec(line);
    if (heading) {
      const level = heading[1].length;
      html.push(`<h${level} id="${slug(heading[2])}">${inline(heading[2])}</h${level}>`);
      k++;
    } else if (line.startsWith('```')) {
      const body: string[] = [];
      for (k++; k < lines.length && !lines[k].startsWith('```'); k++) body.push(lines[k]);
      k++;
      html.push(`<pre><code>${escapeHtml(body.join('\n'))}</code></pre>`);
    } else if (/^ {4}/.test(line)) {
      const body: string[] = [];
      for (; k < lines.length && (/^ {4}/.test(lines[k]) || (lines[k].trim() === '' && /^ {4}/.test(lines[k + 1] ?? ''))); k++) body.push(lines[k].slice(4));
      html.push(`<pre><code>${escapeHtml(body.join('\n'))}</code></pre>`);
    } else if (line.startsWith('|')) {
      const rows: string[][] = [];
      for (; k < lines.length && lines[k].startsWith('|'); k++) if (!/^\|[\s:|-]+\|?$/.test(lines[k])) rows.push(cells(lines[k]));
      const [head, ...body] = rows;
      html.push(
        `<table><thead><tr>${head.map((c) => `<th>${inline(c)}</th>`).join('')}</tr></thead><tbody>${body
          .map((r) => `<tr>${r.map((c) => `<td>${inline(c)}</td>`).join('')}</tr>`)
          .join('')}</tbody></table>`,
      );
    } else if (line.startsWith('>')) {
      const body: string[] = [];
      for (; k < lines.length && lines[k].startsWith('>'); k++) body.push(lines[k].replace(/^> ?/, ''));
      html.push(`<blockquote>${renderMarkdown(body.join('\n'))}</blockquote>`);
    } else if (/^\s*([-*]|\d+\.) /.test(line)) {
      const ordered = /^\s*\d+\. /.test(line);
      const items: string[] = [];
      for (; k < lines.length && lines[k].trim() !== ''; k++) {
        if (/^\s*([-*]|\d+\.) /.test(lines[k])) items.push(lines[k].replace(/^\s*([-*]|\d+\.) /, ''));
        else items[items.length - 1] += ` ${lines[k].trim()}`;
      }
      const tag = ordered ? 'ol' : 'ul';
      html.push(`<${tag}>${items.map((i) => `<li>${inline(i)}</li>`).join('')}</${tag}>`);
    } else {
      const body: string[] = [];
      for (; k < lines.length && lines[k].trim() !== '' && !isBlockStart(lines[k]); k++) body.push(lines[k].trim());
      html.push(`<p>${inline(body.join(' '))}</p>`);
    }
  }
  return html.join('\n');
}
