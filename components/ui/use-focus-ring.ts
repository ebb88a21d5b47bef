import { useCallback, useEffect, useState } from 'react';
import { Platform } from 'react-native';

let keyboardModality = false;
let installed = false;

/** Tracks whether the last interaction was a key press, like CSS `:focus-visible`. */
function installModalityListeners() {
  if (installed || Platform.OS !== 'web' || typeof window === 'undefined') return;
  installed = true;
  window.addEventListener(
    'keydown',
    (event) => {
      if (!event.metaKey && !event.altKey && !event.ctrlKey) keyboardModality = true;
    },
    true,
  );
  const pointer = () => {
    keyboardModality = false;
  };
  window.addEventListener('pointerdown', pointer, true);
  window.addEventListener('mousedown', pointer, true);
  window.addEventListener('touchstart', pointer, true);
}

/** Focus state for pressables: a ring for keyboard users, none after a tap or click. */
export function useFocusRing() {
  const [focused, setFocused] = useState(false);
  useEffect(installModalityListeners, []);
  const onFocus = useCallback(() => setFocused(Platform.OS !== 'web' || keyboardModality), []);
  const onBlur = useCallback(() => setFocused(false), []);
  return { focused, onFocus, onBlur };
}
