import { Platform } from 'react-native';
import { theme } from '@/components/theme';

/**
 * A visible focus ring for keyboard users on the web: every focusable element (links, buttons,
 * inputs, chips) gets a 3 px outline in the product's teal when focused from the keyboard
 * (:focus-visible), none for mouse clicks. react-native-web writes its styles as classes at run
 * time; this rule is added once, after them, and wins with !important. The CSP allows inline
 * styles ('unsafe-inline' for style-src), not inline scripts; this is a style element.
 */
export function installFocusRing(): void {
  if (Platform.OS !== 'web' || typeof document === 'undefined' || document.getElementById('ql-focus-ring')) return;
  const style = document.createElement('style');
  style.id = 'ql-focus-ring';
  style.textContent = `:focus-visible { outline: 3px solid ${theme.color.electron} !important; outline-offset: 2px !important; box-shadow: 0 0 0 5px #FFFFFF !important; }`;
  document.head.appendChild(style);
}
