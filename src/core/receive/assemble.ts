import type { Interval } from '../timeline.js';
import type { CodeTrie } from './trie.js';
import type { Segment } from './viterbi.js';

/** One decoded character with its key-down span. */
export interface DecodedCharacter {
  /** As printed: `A`, `7`, `<AR>`, or `*` for a pattern that is not a known character. */
  text: string;
  /** Start of its first mark [ms from the start of the audio]. */
  startMs: number;
  /** End of its last mark [ms]. */
  endMs: number;
  /** Dots and dashes as received, e.g. `.-`. */
  pattern: string;
  /** How sure the decoder is, 0…1 (the weakest element or gap decision of the character). */
  confidence: number;
}

/**
 * Turns decided segments into marks, characters and text, in order, calling `onText` with each
 * piece of text as it becomes final. Holds only the character being assembled.
 * @example const a = new Assembler(buildCodeTrie()); a.feed(markE, 0, 60, 1); a.feed(wordGap, 60, 480, 1); a.flush(); a.decodedText //=> 'E'
 */
export class Assembler {
  readonly marks: Interval[] = [];
  readonly characters: DecodedCharacter[] = [];
  private text = '';
  private pattern = '';
  // Set at the first mark of each character; NaN until then (numbers with fractions from the
  // start, so the engine never has to widen these fields from small integers mid-recording).
  private startMs = NaN;
  private endMs = NaN;
  private confidence = NaN;
  private spacePending = false;

  constructor(
    private readonly trie: CodeTrie,
    private readonly onText?: (text: string) => void,
  ) {}

  /** The text decided so far. */
  get decodedText(): string {
    return this.text;
  }

  /**
   * Takes the next segment.
   * @param segment - The decided segment.
   * @param startMs - Its start [ms]. @param endMs - Its end [ms].
   * @param confidence - Probability (0…1) that it is what the decoder says.
   */
  feed(segment: Segment, startMs: number, endMs: number, confidence: number): void {
    switch (segment.kind) {
      case 'mark':
        if (this.pattern === '') {
          this.startMs = startMs;
          this.confidence = 1;
        }
        this.pattern += this.trie.symbol[segment.node] === 1 ? '-' : '.';
        this.endMs = endMs;
        this.confidence = Math.min(this.confidence, confidence);
        this.marks.push([startMs, endMs]);
        break;
      case 'element-gap':
        this.confidence = Math.min(this.confidence, confidence);
        break;
      case 'letter-gap':
        this.closeCharacter();
        break;
      case 'word-gap':
      case 'idle':
        this.closeCharacter();
        if (this.text !== '') this.spacePending = true;
        break;
    }
  }

  /** Closes the character in progress (end of the recording). */
  flush(): void {
    this.closeCharacter();
  }

  private closeCharacter(): void {
    if (this.pattern === '') return;
    const known = this.trie.text[this.trieIndex(this.pattern)] ?? null;
    const text = known ?? '*';
    let piece = text;
    if (this.spacePending && this.text !== '') piece = ' ' + piece;
    this.spacePending = false;
    this.text += piece;
    this.characters.push({ text, startMs: this.startMs, endMs: this.endMs, pattern: this.pattern, confidence: known ? this.confidence : this.confidence * 0.5 });
    this.pattern = '';
    this.onText?.(piece);
  }

  private trieIndex(pattern: string): number {
    let node = 0;
    for (const c of pattern) {
      node = c === '-' ? this.trie.dashChild[node]! : this.trie.dotChild[node]!;
      if (node < 0) return -1;
    }
    return node;
  }
}
