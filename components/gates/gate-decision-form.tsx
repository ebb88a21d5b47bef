import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Chip } from '@/components/ui/chip';
import { Select } from '@/components/ui/select';
import { Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { colors, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useProgramMembersQuery } from '@/hooks/queries/members';
import { useGateDecisionMutation } from '@/hooks/queries/readiness';
import { useSession } from '@/hooks/use-session';
import { ROLE_LABELS } from '@/shared/schemas/auth';
import { GateDecisionSchema, READINESS_RESULTS, type GateReview, type ReadinessResult } from '@/shared/schemas/readiness';
import { resultLabel } from '@/components/readiness/readiness-words';
import { dayFrom } from './gate-words';

type ActionDraft = { title: string; ownerId: string | null; dueDate: string };
type Errors = Record<string, string>;

const emptyAction = (): ActionDraft => ({ title: '', ownerId: null, dueDate: '' });

/** Maps the schema's issue paths ("actions.0.title") to sentences for the fields. */
function issuesToErrors(issues: ReadonlyArray<{ path: PropertyKey[]; message: string }>): Errors {
  const out: Errors = {};
  for (const issue of issues) {
    const key = issue.path.map(String).join('.');
    if (!out[key]) out[key] = issue.message;
  }
  return out;
}

/** The lead records the decision once: go, conditional go with actions, or no-go. */
export function GateDecisionForm({ review }: { review: GateReview }) {
  const { user } = useSession();
  const members = useProgramMembersQuery(review.programId);
  const decide = useGateDecisionMutation(review.id);
  const [decision, setDecision] = useState<ReadinessResult | null>(null);
  const [notes, setNotes] = useState('');
  const [actions, setActions] = useState<ActionDraft[]>([emptyAction()]);
  const [errors, setErrors] = useState<Errors>({});
  const [failure, setFailure] = useState<string | null>(null);
  const [today] = useState(() => new Date());

  // Who can own an action: the program's members who work in it (administrators own none), the
  // signed-in lead first, then the review's attendees, then everyone else by name.
  const attending = new Set(review.attendees.map((a) => a.userId).filter(Boolean));
  const owners = (members.data ?? [])
    .filter((m) => m.role !== 'admin')
    .map((m, i) => ({ ...m, rank: m.id === user?.id ? 0 : attending.has(m.id) ? 1 : 2, i }))
    .sort((a, b) => a.rank - b.rank || a.i - b.i)
    .map((m) => ({ id: m.id, name: m.id === user?.id ? `${m.name} (you)` : m.name, role: m.role }));

  const update = (index: number, patch: Partial<ActionDraft>) =>
    setActions((list) => list.map((a, i) => (i === index ? { ...a, ...patch } : a)));

  const submit = async () => {
    setFailure(null);
    if (!decision) {
      setErrors({ decision: 'Choose go, conditional go or no-go.' });
      return;
    }
    const body = {
      decision,
      notes: notes.trim(),
      actions: decision === 'conditional' ? actions.map((a) => ({ title: a.title.trim(), ownerId: a.ownerId ?? '', dueDate: a.dueDate })) : [],
    };
    const parsed = GateDecisionSchema.safeParse(body);
    if (!parsed.success) {
      const found = issuesToErrors(parsed.error.issues);
      for (const [key, message] of Object.entries(found)) {
        if (/^actions\.\d+\.ownerId$/.test(key)) found[key] = 'Choose who owns this action.';
        else if (/^actions\.\d+\.dueDate$/.test(key)) found[key] = message.startsWith('Use') ? message : 'Enter a due date like 2026-12-31.';
      }
      setErrors(found);
      return;
    }
    setErrors({});
    try {
      await decide.mutateAsync(body);
    } catch (cause) {
      setFailure(errorMessage(cause, { 'request/conflict': 'The decision was already recorded, or the review changed: the page now shows the record.' }));
    }
  };

  return (
    <Card style={styles.card} testID="gate-decision">
      <Heading level={2} variant="heading">
        Record the decision
      </Heading>
      <Text tone="muted">The decision is recorded once and e-mailed to the program’s members. Afterwards the record cannot be changed.</Text>
      <View style={styles.choices} role="radiogroup" aria-label="Decision">
        {READINESS_RESULTS.map((result) => (
          <Chip
            key={result}
            kind="radio"
            label={resultLabel(result)}
            selected={decision === result}
            onPress={() => setDecision(result)}
            testID={`gate-decision-${result}`}
          />
        ))}
      </View>
      {errors.decision ? <Text tone="danger">{errors.decision}</Text> : null}
      {decision === 'conditional' ? (
        <View style={styles.actions} testID="gate-actions-form">
          <Heading level={3} variant="bodyStrong">
            Actions (at least one, each with an owner and a due date)
          </Heading>
          {errors.actions ? <Text tone="danger">{errors.actions}</Text> : null}
          {actions.map((action, i) => (
            <View key={i} style={styles.action}>
              <TextField
                label={`Action ${i + 1}: what must be done`}
                value={action.title}
                onChangeText={(title) => update(i, { title })}
                error={errors[`actions.${i}.title`]}
                testID={`gate-action-title-${i}`}
              />
              <Select
                label="Owner"
                layout="chips"
                options={owners.map((p) => ({ value: p.id, label: p.name, description: ROLE_LABELS[p.role] }))}
                value={action.ownerId}
                onChange={(ownerId) => update(i, { ownerId })}
                error={errors[`actions.${i}.ownerId`]}
                hint={members.isPending ? 'Loading the program’s people…' : owners.length === 0 ? 'Nobody works in this program yet.' : undefined}
                testID={`gate-action-owner-${i}`}
              />
              <TextField
                label="Due date"
                value={action.dueDate}
                onChangeText={(dueDate) => update(i, { dueDate: dueDate.trim() })}
                placeholder="2026-12-31"
                hint="Year-month-day."
                autoCorrect={false}
                error={errors[`actions.${i}.dueDate`]}
                testID={`gate-action-due-${i}`}
              />
              <View style={styles.choices}>
                <Chip label="In a week" selected={action.dueDate === dayFrom(today, 7)} onPress={() => update(i, { dueDate: dayFrom(today, 7) })} testID={`gate-action-due-${i}-7`} />
                <Chip label="In 2 weeks" selected={action.dueDate === dayFrom(today, 14)} onPress={() => update(i, { dueDate: dayFrom(today, 14) })} testID={`gate-action-due-${i}-14`} />
                {actions.length > 1 ? (
                  <Chip label={`Remove action ${i + 1}`} onPress={() => setActions((list) => list.filter((_, k) => k !== i))} testID={`gate-action-remove-${i}`} />
                ) : null}
              </View>
            </View>
          ))}
          <Button label="Add another action" icon="plus" variant="secondary" compact onPress={() => setActions((list) => [...list, emptyAction()])} testID="gate-action-add" />
        </View>
      ) : null}
      <TextField label="Decision notes (optional)" value={notes} onChangeText={setNotes} multiline testID="gate-decision-notes" />
      {failure ? <Notice message={failure} testID="gate-decision-error" /> : null}
      <Button label="Record the decision" onPress={() => void submit()} loading={decide.isPending} testID="gate-decision-submit" />
    </Card>
  );
}

const styles = StyleSheet.create({
  card: { gap: spacing.md },
  choices: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  actions: { gap: spacing.lg },
  action: { gap: spacing.sm, paddingLeft: spacing.md, borderLeftWidth: 2, borderColor: colors.border },
});
