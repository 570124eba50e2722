import { colors, fonts } from './theme';

// Web only: a visible keyboard focus ring on every focusable element (shown for keyboard focus,
// not for mouse clicks), the page background, and no tap highlight. Installed once at start.
const css = `
html, body, #root { background: ${colors.paper}; color: ${colors.ink}; font-family: ${fonts.text}, system-ui, sans-serif; }
a:focus-visible, button:focus-visible, input:focus-visible, select:focus-visible, textarea:focus-visible,
[tabindex]:focus-visible { outline: 3px solid ${colors.focus} !important; outline-offset: 2px; }
:focus:not(:focus-visible) { outline: none; }
input, select, textarea { font-family: ${fonts.text}, system-ui, sans-serif; }
* { -webkit-tap-highlight-color: transparent; }
`;

let installed = false;
export function installGlobalStyles(): void {
  if (installed || typeof document === 'undefined') return;
  installed = true;
  const el = document.createElement('style');
  el.setAttribute('data-keel', 'global');
  el.textContent = css;
  document.head.appendChild(el);
}
