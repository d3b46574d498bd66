// Files on the user's machine: reading a chosen file as text and offering text or bytes for download.
// Nothing leaves the machine: downloads are blob: URLs made in the page.

/** The text of a file the user picked. */
export function readText(file: File): Promise<string> {
  return file.text();
}

/** Offers `content` (text, or bytes exactly as given) as a download named `name`. */
export function download(name: string, content: string | Uint8Array, type = 'application/json'): void {
  // A copy over a plain ArrayBuffer, as Blob takes (the bytes are unchanged).
  const part = typeof content === 'string' ? content : new Uint8Array(content);
  const url = URL.createObjectURL(new Blob([part], { type }));
  const link = document.createElement('a');
  link.href = url;
  link.download = name;
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
