import { useEffect } from 'react';
import { boardCss, type PageSize } from '../../src/report/board-style';

/**
 * The board summary's own stylesheet in the app. The CSP allows no inline <style> or style
 * attributes, so the same CSS the printed file embeds is adopted as a constructable stylesheet while
 * the Board summary tab is open, with the screen preview and the print rules: in print, only the
 * print view (a sibling of the app's root) is shown.
 */
const APP_RULES = `
.board-print-root { display: none; }
.board-preview { background: #e4e8e4; border: 1px solid #d9ddd8; border-radius: 4px; padding: 16px; overflow: auto; }
.board-paper { margin: 0 auto; background: #ffffff; box-shadow: 0 2px 10px rgba(0, 0, 0, 0.18); padding: 9mm; }
.board-paper + .board-paper { margin-top: 16px; }
.board-paper.page-A4 { width: 210mm; min-height: 297mm; }
.board-paper.page-Letter { width: 215.9mm; min-height: 279.4mm; }
.board-controls { display: flex; flex-wrap: wrap; align-items: center; gap: 0.5rem 1rem; margin: 0 0 0.8rem; }
.board-controls label { display: inline-flex; align-items: center; gap: 0.35rem; }
.board-controls .board-actions { display: flex; flex-wrap: wrap; gap: 0.4rem; margin-left: auto; }
.board-maps { display: flex; flex-wrap: wrap; align-items: center; gap: 0.4rem; margin: 0 0 0.8rem; }
.board-maps .board-maps-title { color: #5b6770; }
.board-status { margin: 0 0 0.8rem; }
@media print {
  html, body { background: #ffffff !important; margin: 0 !important; }
  #root { display: none !important; }
  .board-print-root { display: block; }
}
`;

export function useBoardStylesheet(page: PageSize): void {
  useEffect(() => {
    const sheet = new CSSStyleSheet();
    sheet.replaceSync(`${boardCss(page)}\n${APP_RULES}`);
    document.adoptedStyleSheets = [...document.adoptedStyleSheets, sheet];
    return () => {
      document.adoptedStyleSheets = document.adoptedStyleSheets.filter((s) => s !== sheet);
    };
  }, [page]);
}
