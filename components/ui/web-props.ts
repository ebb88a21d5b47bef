import { Platform } from 'react-native';

type WebAttribute = string | number | boolean | undefined;

/**
 * ARIA attributes that react-native-web renders but React Native's types do not declare
 * (`aria-current`, `aria-level`, `aria-describedby`, `aria-invalid` ...). Spread onto a view.
 */
export function webOnly(attributes: Record<string, WebAttribute>): object {
  if (Platform.OS !== 'web') return {};
  const out: Record<string, WebAttribute> = {};
  for (const [key, value] of Object.entries(attributes)) {
    if (value !== undefined) out[key] = value;
  }
  return out;
}
