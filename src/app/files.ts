// Files on the user's machine: reading a chosen file as text and offering text for download.
// Nothing leaves the machine: downloads are blob: URLs made in the page.

/** The text of a file the user picked. */
export function readText(file: File): Promise<string> {
  return file.text();
}

/** Offers `text` as a download named `name`. */
export function download(name: string, text: string, type = 'application/json'): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const link = document.createElement('a');
  link.href = url;
  link.download = name;
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
