// Names and notes typed by people end up in PDFs, CSV sheets and mail text. Unicode lets a
// string carry things no one sees: line breaks that start a new line in a mail, bidi
// overrides that display a file name backwards ("gnp.exe"), zero-width characters that
// make two names look equal or a note look written.

/* eslint-disable no-control-regex */
/** C0/C1 controls (tab, CR, LF, …): a name is one line, so they become spaces. */
const CONTROLS = /[\u0000-\u001f\u007f-\u009f\u2028\u2029]/g
/** Bidi embeddings, overrides and isolates, zero-width characters, word joiner, BOM, soft hyphen. */
// The list holds lone combining marks on purpose (U+034F): each is stripped on its own.
// eslint-disable-next-line no-misleading-character-class
const INVISIBLE = /[\u200b-\u200f\u202a-\u202e\u2060-\u2064\u2066-\u2069\u00ad\u034f\u061c\u115f\u1160\u17b4\u17b5\u180e\u3164\ufeff\uffa0]/g
/* eslint-enable no-control-regex */

/** One line of visible text: NFC, controls as spaces, invisible characters removed, runs of spaces as one. */
export function cleanName(value: string): string {
  return value.normalize('NFC').replace(INVISIBLE, '').replace(CONTROLS, ' ').replace(/\s+/g, ' ').trim()
}

/** A note may keep its line breaks; other controls and the invisible characters go. */
export function cleanNote(value: string): string {
  return value.normalize('NFC').replace(/\r\n?/g, '\n').replace(INVISIBLE, '')
    // eslint-disable-next-line no-control-regex
    .replace(/[\u0000-\u0009\u000b-\u001f\u007f-\u009f]/g, ' ').trim()
}

/** How many characters a reader sees: letters, digits, marks, punctuation, symbols (not spaces). */
export function visibleLength(value: string): number {
  return [...value.normalize('NFC').replace(INVISIBLE, '')].filter((c) => /[\p{L}\p{N}\p{P}\p{S}]/u.test(c)).length
}

/** Removes only the invisible characters (for file names, which are otherwise checked as sent). */
export function stripInvisible(value: string): string {
  return value.normalize('NFC').replace(INVISIBLE, '')
}
