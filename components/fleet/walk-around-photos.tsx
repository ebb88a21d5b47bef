import { PhotoPicker } from '@/components/photos/photo-picker';

/**
 * Walk-around photos for a check-out or check-in: picked, resized and uploaded to the vehicle
 * like every other photo (the photo picker), kept in the form once sent and linked to the check
 * by id. Each photo keeps one Idempotency-Key across retries.
 */
export function WalkAroundPhotos({
  assetId,
  onChange,
  testID,
}: {
  assetId: string;
  /** The ids of the photos sent so far, and whether any is still on its way. */
  onChange: (state: { photoIds: string[]; busy: boolean }) => void;
  testID: string;
}) {
  return (
    <PhotoPicker
      assetId={assetId}
      heading="Walk-around photos (optional)"
      label="Take photo"
      againLabel="Take another photo"
      name="Walk-around photo"
      keepSent
      onChange={onChange}
      testID={`${testID}-photo`}
      rowTestID={`${testID}-photo`}
    />
  );
}
