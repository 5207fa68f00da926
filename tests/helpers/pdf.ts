// Reads a PDF the way a viewer would (Mozilla's PDF.js, the pdfjs-dist package): page count and each page's text.
import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs';

/** The text of each page of `bytes`, in reading order; throws when the file is not a PDF. */
export async function pdfPages(bytes: ArrayBuffer | Uint8Array): Promise<string[]> {
  // PDF.js wants a plain Uint8Array (not a Buffer), which it may detach: always hand it a copy.
  const data = bytes instanceof Uint8Array ? Uint8Array.from(bytes) : new Uint8Array(bytes.slice(0));
  const pdf = await getDocument({ data, useSystemFonts: false, isEvalSupported: false }).promise;
  const pages: string[] = [];
  for (let n = 1; n <= pdf.numPages; n++) {
    const page = await pdf.getPage(n);
    const content = await page.getTextContent();
    pages.push(
      content.items
        .map((item) => ('str' in item ? item.str : ''))
        .join(' ')
        .replace(/\s+/g, ' '),
    );
  }
  await pdf.destroy();
  return pages;
}
