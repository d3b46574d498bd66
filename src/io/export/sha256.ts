// SHA-256 of bytes as lowercase hex, through the Web Crypto API that browsers and
// Node 20 both provide (globalThis.crypto.subtle). Callers may pass their own.
import { ExportError } from '../../core/errors.ts';

/** A SHA-256 function: bytes in, 64 lowercase hex digits out. */
export type Sha256 = (bytes: Uint8Array) => Promise<string>;

/** SHA-256 by crypto.subtle (browsers in a secure context, Node 20+). */
export const sha256Hex: Sha256 = async (bytes) => {
  const subtle = globalThis.crypto?.subtle;
  if (!subtle) throw new ExportError('sha256: this environment has no crypto.subtle; pass a SHA-256 function');
  const digest = new Uint8Array(await subtle.digest('SHA-256', bytes as Uint8Array<ArrayBuffer>));
  return Array.from(digest, (b) => b.toString(16).padStart(2, '0')).join('');
};
