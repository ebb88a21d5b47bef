import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Badge, type BadgeTone } from '@/components/ui/chip';
import { Checkbox } from '@/components/ui/checkbox';
import { Screen } from '@/components/ui/screen';
import { Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { TextLink } from '@/components/ui/text-link';
import { colors, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import {
  refusedImportRows,
  useImportApplyMutation,
  useImportPreviewMutation,
  type ImportRequest,
  type ReadoutInput,
} from '@/hooks/queries/software';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { SOFTWARE_ERROR_SENTENCES } from '@/shared/api/software-paths';
import type { ImportOutcome, ImportPreview, ImportResult, ImportRow } from '@/shared/schemas/software';
import { rowsFromPastedText } from './paste-readout';
import { CAN_PICK_FILES, ReadoutFileButton } from './readout-file-button';
import { SoftwareHeader } from './software-header';
import { StatusTag } from './status-tag';

const OUTCOME_LABELS: Record<ImportOutcome, string> = {
  change: 'Will change',
  unchanged: 'Unchanged',
  unknown: 'Unknown',
  invalid: 'Cannot be read',
};
const OUTCOME_TONES: Record<ImportOutcome, BadgeTone> = {
  change: 'primary',
  unchanged: 'neutral',
  unknown: 'warning',
  invalid: 'danger',
};

/** Preview an ECU identification read-out, then apply it in one go. */
export function SoftwareImportScreen() {
  const { currentProgramId } = useSession();
  const [readout, setReadout] = useState<{ input: ReadoutInput; label: string } | null>(null);
  const [pasted, setPasted] = useState('');
  const [pasteError, setPasteError] = useState<string | null>(null);
  const [skipInvalid, setSkipInvalid] = useState(false);
  const preview = useImportPreviewMutation();
  const apply = useImportApplyMutation();

  const request = (input: ReadoutInput): ImportRequest | null =>
    currentProgramId ? { programId: currentProgramId, readout: input, skipInvalid } : null;

  const runPreview = (input: ReadoutInput, label: string) => {
    const body = request(input);
    if (!body) return;
    setReadout({ input, label });
    apply.reset();
    preview.mutate(body);
  };

  const previewPasted = () => {
    setPasteError(null);
    try {
      const rows = rowsFromPastedText(pasted);
      if (rows.length === 0) {
        setPasteError('Paste a header line and at least one row.');
        return;
      }
      runPreview({ kind: 'rows', rows }, 'the pasted rows');
    } catch {
      setPasteError('The pasted text is neither CSV nor JSON. Check the first line.');
    }
  };

  const applyIt = () => {
    if (!readout) return;
    const body = request(readout.input);
    if (body) apply.mutate({ ...body, skipInvalid });
  };

  const data = preview.data;
  const refusable = data ? data.summary.unknown + data.summary.invalid : 0;
  const refused = refusedImportRows(apply.error);

  return (
    <Screen testID="software-import-screen">
      <SoftwareHeader place="import" title="Import a read-out" />
      <Card style={styles.gap}>
        <Text>
          Choose an ECU identification read-out (CSV or JSON, up to 2 MB) with the asset tag or VIN, the ECU code and the values read
          (F188 software number, F189 software version, F18C serial, F191 hardware number, F190 VIN). Nothing is written until you
          apply it.
        </Text>
        <Text tone="muted">Try the sample read-out from the demo: assets/demo/ecu-readout-sample.csv.</Text>
        {CAN_PICK_FILES ? (
          <ReadoutFileButton onPick={(file) => runPreview({ kind: 'file', name: file.name, blob: file.blob }, file.name)} testID="import-file" />
        ) : null}
        <TextField
          label={CAN_PICK_FILES ? 'Or paste the read-out' : 'Paste the read-out'}
          value={pasted}
          onChangeText={setPasted}
          multiline
          numberOfLines={5}
          autoCapitalize="none"
          autoCorrect={false}
          placeholder="asset_tag,ecu,F189"
          error={pasteError ?? undefined}
          testID="import-paste"
        />
        <Button label="Preview the pasted rows" variant="secondary" compact disabled={!pasted.trim()} onPress={previewPasted} testID="import-paste-preview" />
      </Card>

      {preview.isPending ? <Notice tone="warning" message={`Reading ${readout?.label ?? 'the read-out'}…`} /> : null}
      {preview.isError ? <Notice message={errorMessage(preview.error, SOFTWARE_ERROR_SENTENCES)} testID="import-error" /> : null}

      {data && !apply.isSuccess ? (
        <View style={styles.gap} testID="import-preview">
          <Heading level={2} variant="heading">
            Preview of {readout?.label}
          </Heading>
          <Summary summary={data.summary} />
          <PreviewRows rows={data.rows} />
          {refusable > 0 ? (
            <Checkbox
              label="Skip the rows that cannot be applied"
              description={`${refusable} row${refusable === 1 ? '' : 's'} unknown or unreadable; the others are applied.`}
              checked={skipInvalid}
              onChange={setSkipInvalid}
              testID="import-skip-invalid"
            />
          ) : null}
          {apply.isError ? (
            <View style={styles.gap}>
              <Notice message={errorMessage(apply.error, refused.length ? {} : SOFTWARE_ERROR_SENTENCES)} testID="import-apply-error" />
              {refused.length ? <PreviewRows rows={refused} prefix="import-refused" /> : null}
            </View>
          ) : null}
          <Button
            label={data.summary.change === 0 ? 'Nothing to change' : `Apply ${data.summary.change} change${data.summary.change === 1 ? '' : 's'}`}
            disabled={data.summary.change === 0}
            loading={apply.isPending}
            onPress={applyIt}
            testID="import-apply"
          />
        </View>
      ) : null}

      {apply.isSuccess ? <Done result={apply.data} /> : null}
    </Screen>
  );
}

function Summary({ summary }: { summary: ImportPreview['summary'] }) {
  return (
    <View style={styles.badges} testID="import-summary">
      {(Object.keys(OUTCOME_LABELS) as ImportOutcome[]).map((outcome) => (
        <Badge key={outcome} label={`${OUTCOME_LABELS[outcome]}: ${summary[outcome]}`} tone={OUTCOME_TONES[outcome]} />
      ))}
    </View>
  );
}

function PreviewRows({ rows, prefix = 'import-row' }: { rows: ImportRow[]; prefix?: string }) {
  const { isWide } = useBreakpoints();
  return (
    <View style={styles.rows} role="list">
      {rows.map((row) => (
        <View key={row.row} role="listitem" style={[styles.row, isWide && styles.rowWide]} testID={`${prefix}-${row.row}`}>
          <View style={[styles.rowHead, isWide && styles.rowHeadWide]}>
            <Text variant="label">Row {row.row}</Text>
            <Text variant="bodyStrong">
              {row.tag ?? row.vin ?? 'No asset'} · {row.ecuCode ?? 'no ECU'}
            </Text>
            <Badge label={OUTCOME_LABELS[row.outcome]} tone={OUTCOME_TONES[row.outcome]} />
          </View>
          <View style={styles.rowBody}>
            {row.before || row.after ? (
              <Text>
                {row.before?.softwareVersion || 'nothing recorded'} → {row.after?.softwareVersion || '—'}
                {row.changes.length && row.outcome === 'change' ? ` (${row.changes.map(changeWord).join(', ')})` : ''}
              </Text>
            ) : null}
            {row.status || row.outcome === 'change' ? <StatusTag status={row.status} /> : null}
            {row.reasons.map((reason) => (
              <Text key={reason} tone={row.outcome === 'invalid' ? 'danger' : row.outcome === 'unknown' ? 'warning' : 'muted'}>
                {reason}
              </Text>
            ))}
          </View>
        </View>
      ))}
    </View>
  );
}

const CHANGE_WORDS: Record<string, string> = {
  softwareVersion: 'version',
  softwareNumber: 'software number',
  hardwareNumber: 'hardware number',
  ecuSerial: 'serial',
};
const changeWord = (field: string) => CHANGE_WORDS[field] ?? field;

function Done({ result }: { result: ImportResult }) {
  const message =
    `Imported: ${result.applied} ECU${result.applied === 1 ? '' : 's'} updated` +
    (result.summary.unchanged ? `, ${result.summary.unchanged} unchanged` : '') +
    (result.skipped ? `, ${result.skipped} row${result.skipped === 1 ? '' : 's'} skipped` : '') +
    '.';
  return (
    <View style={styles.gap}>
      <Notice tone="success" message={message} testID="import-done" />
      <TextLink href="/software" label="See the matrix" testID="import-to-matrix" />
      <TextLink href="/software/reflash" label="See the reflash list" />
    </View>
  );
}

const styles = StyleSheet.create({
  gap: {
    gap: spacing.md,
  },
  badges: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  rows: {
    borderTopWidth: 1,
    borderTopColor: colors.border,
  },
  row: {
    paddingVertical: spacing.sm,
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
    gap: spacing.xs,
  },
  rowWide: {
    flexDirection: 'row',
    gap: spacing.lg,
  },
  rowHead: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.sm,
  },
  rowHeadWide: {
    width: 360,
  },
  rowBody: {
    flex: 1,
    gap: spacing.xs,
  },
});
