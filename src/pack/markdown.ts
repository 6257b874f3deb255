/** index.md: the pack tree as GitHub-flavoured Markdown, charts as image files beside it. */
import type { Root, RootContent, Text } from 'mdast';
import type { Handle } from 'mdast-util-to-markdown';
import remarkGfm from 'remark-gfm';
import remarkStringify from 'remark-stringify';
import { unified } from 'unified';
import { type ByteSink, type FileRange, memorySink } from './bytes.ts';

const ZWSP = '\u200b';
const encoder = new TextEncoder();
const BLANK_LINE = encoder.encode('\n\n');
const LINE_END = encoder.encode('\n');

/**
 * GFM turns bare URLs, www. addresses and e-mail addresses in text into
 * links, and remark's escape of "https\://" does not stop it (nor GitHub's
 * renderer). Text from the data must not link out, so a zero-width space
 * goes where each of those patterns starts; the text reads the same. Only
 * index.md needs this: the HTML and PDF are made from the tree, not parsed.
 */
export function defang(value: string): string {
  // Every pattern below needs one of these; most text has none.
  if (!/[:.@]/.test(value)) return value;
  return value
    .replace(/\b(https?|ftp|mailto|file|javascript|data|xmpp)(:)/gi, `$1${ZWSP}$2`)
    .replace(/\b(www)(\.)/gi, `$1${ZWSP}$2`)
    .replace(/([\w.+-])@/g, `$1${ZWSP}@`);
}

type State = Parameters<Handle>[2];
type Info = Parameters<Handle>[3];

/**
 * Text that `state.safe` would return unchanged. It escapes only characters
 * that some unsafe pattern names, and among those a space only next to a line
 * ending (or in a fence's info string, which text never is); it also
 * doubles a backslash before punctuation, which may lie in what follows. So
 * text without a line ending, without a pattern's character but the space,
 * with no space at either end and no backslash after it, is its own safe
 * form. The pattern list is read from the processor's own state.
 */
const plainFor = new WeakMap<State['unsafe'], RegExp>();
function isPlain(value: string, state: State, info: Info): boolean {
  let plain = plainFor.get(state.unsafe);
  if (!plain) {
    const chars = new Set(state.unsafe.map((p) => p.character));
    chars.delete(' ');
    // Backslashes are escaped apart from the patterns (escapeBackslashes), whatever the list says.
    chars.add('\\');
    const cls = [...chars].map((c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`).join('');
    plainFor.set(state.unsafe, (plain = new RegExp(`^(?! )[^${cls}]*$`)));
  }
  return value !== '' && !value.endsWith(' ') && !(info.after ?? '').includes('\\') && plain.test(value);
}

// Text is defanged as it is written (the stock text handler is `state.safe(node.value, info)`),
// so the tree is neither changed nor copied: a plant's tree is tens of megabytes. Plain text skips
// `state.safe`, which runs some forty patterns over every string: a plant's index.md took 3.6–4.0 s, now 1.9 s.
const text: Handle = (node: Text, _parent, state, info) => {
  const value = defang(node.value);
  return isPlain(value, state, info) ? value : state.safe(value, info);
};

const processor = unified().use(remarkGfm).use(remarkStringify, { bullet: '-', fences: true, rule: '-', handlers: { text } });

export function toMarkdown(tree: Root): string {
  return processor.stringify(tree);
}

/**
 * index.md as UTF-8 bytes from the tree's parts (splitParts: the cover,
 * then each level-2 heading with what follows it), each written alone or,
 * where `known` has it, taken as an earlier build wrote it; `fresh` hears
 * of each part written here. remark joins a root's blocks with a blank
 * line, and a part begins with a heading, which nothing before it changes,
 * so the parts joined by a blank line are the whole document's bytes
 * (test/pack/parts.test.ts).
 */
export function toMarkdownByParts(parts: readonly (readonly RootContent[])[], known: (i: number) => Uint8Array | undefined, fresh: (i: number, md: Uint8Array) => void): Uint8Array {
  const sink = memorySink(() => {
    throw new Error('internal: no part is known by its place in a file here');
  });
  writeMarkdownByParts(parts, known, fresh, sink);
  return sink.bytes();
}

/**
 * index.md into `sink`, part by part: a known part as its text (ending in
 * its line end, which the joins replace), or as the range of an earlier
 * index.md that holds it as written there (without); `placed` hears where
 * each part's text went.
 */
export function writeMarkdownByParts(
  parts: readonly (readonly RootContent[])[],
  known: (i: number) => Uint8Array | FileRange | undefined,
  fresh: (i: number, md: Uint8Array) => void,
  sink: ByteSink,
  placed: (i: number, start: number, end: number) => void = () => {},
): void {
  parts.forEach((nodes, i) => {
    let md = known(i);
    if (md === undefined) fresh(i, (md = encoder.encode(processor.stringify({ type: 'root', children: [...nodes] }))));
    if (i > 0) sink.write(BLANK_LINE);
    const start = sink.length;
    // Each part's text ends with the one line end a document ends with.
    if (md instanceof Uint8Array) sink.write(md.subarray(0, md.length - 1));
    else sink.copy(md);
    placed(i, start, sink.length);
  });
  sink.write(LINE_END);
}
