/** Text of every page of a PDF, read back with pdfjs-dist (Mozilla's PDF.js, legacy Node build). */
import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs';

/** Each page's text on its own, whitespace collapsed, for tests of what shares a page. */
export async function extractPdfPages(bytes: Uint8Array): Promise<string[]> {
  const doc = await getDocument({
    data: new Uint8Array(bytes),
    isEvalSupported: false,
    disableFontFace: true,
    useSystemFonts: false,
    verbosity: 0,
  }).promise;
  const pages: string[] = [];
  for (let i = 1; i <= doc.numPages; i++) {
    const content = await (await doc.getPage(i)).getTextContent();
    pages.push(
      content.items
        .map((item) => ('str' in item ? item.str + (item.hasEOL ? '\n' : '') : ''))
        .join('')
        .replace(/\s+/g, ' ')
        .trim(),
    );
  }
  await doc.destroy();
  await new Promise((resolve) => setTimeout(resolve, 20));
  return pages;
}

export async function extractPdfText(bytes: Uint8Array): Promise<string> {
  const doc = await getDocument({
    data: new Uint8Array(bytes),
    isEvalSupported: false,
    disableFontFace: true,
    useSystemFonts: false,
    verbosity: 0,
  }).promise;
  const pages: string[] = [];
  for (let i = 1; i <= doc.numPages; i++) {
    const content = await (await doc.getPage(i)).getTextContent();
    pages.push(
      content.items.map((item) => ('str' in item ? item.str + (item.hasEOL ? '\n' : '') : '')).join(''),
    );
  }
  await doc.destroy();
  // Parsing keeps the event loop busy for seconds on a loaded machine. Let it run once before
  // the caller's next fetch, so undici sees keep-alive sockets the server closed meanwhile
  // rather than sending on one ("other side closed").
  await new Promise((resolve) => setTimeout(resolve, 20));
  // Collapse the renderer's line breaks so phrases can be searched whole.
  return pages.join('\n').replace(/\s+/g, ' ');
}
