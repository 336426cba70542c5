/**
 * Characters that change how the text around them is displayed without being visible themselves:
 * C0/C1 controls and the bidirectional embedding, override and isolate marks (U+202A–U+202E,
 * U+2066–U+2069, U+200E/U+200F, U+061C). In a file name they can make "invoice‮fdp.csv" look like a
 * different file, so names are stored and shown without them.
 */
// eslint-disable-next-line no-control-regex
const HIDDEN_FORMATTING = /[\u0000-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/g;

/** A client-supplied file name made safe to store and display (Unicode NFC, hidden formatting removed). */
export function cleanFileName(name: string): string {
  return name.normalize('NFC').replace(HIDDEN_FORMATTING, '').trim();
}
