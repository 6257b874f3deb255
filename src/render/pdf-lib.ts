/**
 * pdf-lib, loaded with `require`. It ships CommonJS, and an ESM `import`
 * of it first has Node's CommonJS lexer read the whole bundle for its
 * export names: 176–202 ms against 105–110 ms by `require` (measured on
 * the 2-core machine), on the main thread of every build. The rest of the
 * code takes the values and types it uses from here.
 */
import { createRequire } from 'node:module';
import type * as PdfLib from 'pdf-lib';

const lib = createRequire(import.meta.url)('pdf-lib') as typeof PdfLib;

export const { PDFDocument, PDFName, PDFNumber, PDFPageLeaf, PDFString, rgb } = lib;
export type PDFDocument = PdfLib.PDFDocument;
export type PDFRef = PdfLib.PDFRef;
export type RGB = PdfLib.RGB;
export type PDFPageLeaf = PdfLib.PDFPageLeaf;
