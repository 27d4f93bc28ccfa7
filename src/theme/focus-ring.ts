import { Platform } from 'react-native';
import { light } from './colors';

// One visible keyboard focus ring for every control on the web (WCAG 2.4.7), instead of per-component state.
const CSS = `
:focus-visible { outline: 3px solid ${light.focus} !important; outline-offset: 2px; }
input:focus-visible, textarea:focus-visible { outline-offset: 0; }
`;

/** Adds the focus-ring stylesheet once (web only). */
export function installFocusRing(): void {
  if (Platform.OS !== 'web' || typeof document === 'undefined' || document.getElementById('yp-focus')) return;
  const style = document.createElement('style');
  style.id = 'yp-focus';
  style.textContent = CSS;
  document.head.appendChild(style);
}
