export type PickedReadout = { name: string; blob: Blob };

/** The app has no document picker on a phone (expo-document-picker is not installed): paste the read-out instead. */
export function ReadoutFileButton(_props: { onPick: (file: PickedReadout) => void; testID?: string }) {
  return null;
}

export const CAN_PICK_FILES = false;
