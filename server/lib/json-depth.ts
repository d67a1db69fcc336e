/**
 * A limit on how deeply a JSON request body nests, checked on the raw bytes before JSON.parse (express.json's
 * `verify` hook): one pass that tracks strings and escapes and counts open brackets. Deeply nested bodies are
 * cheap to send and make every recursive walk of the parsed value (validation, comparison, logging) costly or
 * overflow the stack.
 */
import type { IncomingMessage } from 'node:http';
import { AppError } from './app-error';

const QUOTE = 0x22;
const BACKSLASH = 0x5c;
const OPEN_BRACE = 0x7b;
const OPEN_BRACKET = 0x5b;
const CLOSE_BRACE = 0x7d;
const CLOSE_BRACKET = 0x5d;

/**
 * The nesting depth of JSON text (objects and arrays; brackets inside strings do not count), or the first
 * depth past `limit` when it goes deeper. Example: jsonDepth(Buffer.from('{"a":[1,[2]]}')) → 3.
 */
export function jsonDepth(bytes: Uint8Array, limit = Infinity): number {
  let depth = 0;
  let deepest = 0;
  let inString = false;
  for (let i = 0; i < bytes.length; i++) {
    const b = bytes[i];
    if (inString) {
      if (b === BACKSLASH) i++;
      else if (b === QUOTE) inString = false;
    } else if (b === QUOTE) inString = true;
    else if (b === OPEN_BRACE || b === OPEN_BRACKET) {
      if (++depth > deepest) {
        deepest = depth;
        if (deepest > limit) return deepest;
      }
    } else if (b === CLOSE_BRACE || b === CLOSE_BRACKET) depth--;
  }
  return deepest;
}

/** An express.json `verify` hook refusing bodies nested deeper than `maxDepth` (400 naming the limit). */
export function limitJsonDepth(maxDepth: number): (req: IncomingMessage, res: unknown, body: Buffer) => void {
  return (_req, _res, body) => {
    if (jsonDepth(body, maxDepth) > maxDepth) {
      throw new AppError(400, `The JSON body nests deeper than ${maxDepth} levels; send flatter data`, { body: 'nested too deeply' });
    }
  };
}
