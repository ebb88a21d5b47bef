import { Button } from '@/components/ui/button';

export type PickedReadout = { name: string; blob: Blob };

/** The browser's file chooser for one CSV or JSON read-out. */
export function ReadoutFileButton({ onPick, testID }: { onPick: (file: PickedReadout) => void; testID?: string }) {
  const open = () => {
    const input = document.createElement('input');
    input.type = 'file';
    input.accept = '.csv,.json,text/csv,application/json';
    input.style.display = 'none';
    input.addEventListener('change', () => {
      const file = input.files?.[0];
      input.remove();
      if (file) onPick({ name: file.name, blob: file });
    });
    input.addEventListener('cancel', () => input.remove());
    document.body.appendChild(input);
    input.click();
  };
  return <Button label="Choose a file" icon="plus" variant="secondary" onPress={open} testID={testID} accessibilityHint="Opens a CSV or JSON read-out" />;
}

export const CAN_PICK_FILES = true;
