import { Platform } from 'react-native';

// One print stylesheet for every printable record (plan, change request, batch report): the page prints the
// record alone. Navigation and anything marked `*-actions` or the signing form are left off, and the scroll
// containers' fixed heights are released so the whole record flows onto paper.
const CSS = `@media print {
  [data-testid="nav"], [data-testid="topbar"], [data-testid$="-actions"], [data-testid="sign-form"] { display: none !important; }
  html, body, #root, #root > div, [data-testid^="screen-"] { height: auto !important; overflow: visible !important; }
  * { box-shadow: none !important; }
}`;

/** Adds the print stylesheet once (web only). */
export function installPrintStylesheet(): void {
  if (Platform.OS !== 'web' || typeof document === 'undefined' || document.getElementById('yp-print')) return;
  const style = document.createElement('style');
  style.id = 'yp-print';
  style.textContent = CSS;
  document.head.appendChild(style);
}
