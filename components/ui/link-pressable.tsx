import { useRouter } from 'expo-router';
import { Platform, Pressable, type GestureResponderEvent, type PressableProps } from 'react-native';
import { webOnly } from './web-props';

export type LinkPressableProps = Omit<PressableProps, 'onPress' | 'role' | 'accessibilityRole'> & {
  href: string;
  /** Extra ARIA for the web, such as `aria-current`. */
  webAttributes?: Record<string, string | undefined>;
};

/** Lets the browser handle new-tab clicks (modifier keys, middle button) on a real link. */
function opensElsewhere(event: GestureResponderEvent): boolean {
  if (Platform.OS !== 'web') return false;
  const native = event.nativeEvent as unknown as Partial<MouseEvent>;
  return Boolean(native.metaKey || native.ctrlKey || native.shiftKey || native.altKey || (native.button ?? 0) !== 0);
}

/**
 * A pressable area that is a real `<a href>` on the web and navigates inside the app. Used
 * instead of `<Link asChild>`, whose slot cannot merge style arrays or style functions.
 */
export function LinkPressable({ href, webAttributes, ...rest }: LinkPressableProps) {
  const router = useRouter();
  return (
    <Pressable
      role="link"
      {...webOnly({ href, ...webAttributes })}
      onPress={(event) => {
        if (opensElsewhere(event)) return;
        event.preventDefault();
        router.push(href);
      }}
      {...rest}
    />
  );
}
