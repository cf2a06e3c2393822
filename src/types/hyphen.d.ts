// The hyphen package ships no types; this is the part the board's chips use.
declare module 'hyphen/en-gb' {
  /** The text with a soft hyphen (U+00AD) at every break British English hyphenation allows. */
  export function hyphenateSync(text: string, options?: { hyphenChar?: string; minWordLength?: number }): string;
}
