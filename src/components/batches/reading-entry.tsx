import { useEffect, useState } from 'react';
import { StyleSheet, TextInput, View } from 'react-native';
import { readingCaution } from '../../batches/reading-check';
import { CLOCK_SKEW_MIN, READING_MAX_C, READING_MIN_C } from '../../contracts/rules';
import type { useLogReading } from '../../hooks/use-log-reading';
import { useSiteFormat } from '../../hooks/use-site-format';
import { font, radius, space, touchTarget, type as typeScale, useColors } from '../../theme';
import { Button } from '../ui/button';
import { Card } from '../ui/card';
import { Field } from '../ui/field';
import { Text } from '../ui/text';

type Props = { startedAt: string; lastC: number | null; vessel: { name: string; minC: number; maxC: number }; logger: ReturnType<typeof useLogReading> };

/** The operator's entry: a big temperature field, the time (now unless changed), an optional note, and a one-tap repeat. */
export function ReadingEntry({ startedAt, lastC, vessel, logger }: Props) {
  const c = useColors();
  const site = useSiteFormat();
  const [temp, setTemp] = useState('');
  const [time, setTime] = useState(() => site.inputValue(new Date()));
  const [isTimeEdited, setTimeEdited] = useState(false);
  const [note, setNote] = useState('');
  const [errors, setErrors] = useState<{ c?: string; time?: string }>({});
  const [done, setDone] = useState<string | null>(null);
  // A reading outside the vessel's range or far from the last is stored only after a second look.
  const [confirm, setConfirm] = useState<{ c: number; timeText: string | null; message: string } | null>(null);

  // Keep the prefilled time current while the operator has not changed it.
  useEffect(() => {
    if (isTimeEdited) return;
    const t = setInterval(() => setTime(site.inputValue(new Date())), 20_000);
    return () => clearInterval(t);
  }, [isTimeEdited, site]);

  function checkTime(s: string): { at?: Date; error?: string } {
    const at = site.parseInput(s);
    if (!at) return { error: 'Write the time as YYYY-MM-DD HH:mm' };
    if (at.getTime() > Date.now() + CLOCK_SKEW_MIN * 60_000) return { error: 'That time is in the future' };
    if (at.getTime() < Date.parse(startedAt)) return { error: 'That is before the batch started' };
    return { at };
  }

  // The device's copy of a queued reading is announced by the queue's line below, and gone once it is sent.
  // Set while rendering, not in an effect: no frame shows the stale line.
  const [sentShown, setSentShown] = useState(logger.sentCount);
  if (logger.sentCount !== sentShown) {
    setSentShown(logger.sentCount);
    if (logger.sentCount) setDone((d) => (d?.endsWith('on this device') ? null : d));
  }

  /** `timeText` null: the reading is taken now, to the second (the field shows minutes only). */
  async function submit(valueC: number, timeText: string | null, isConfirmed = false) {
    const caution = isConfirmed ? null : readingCaution(valueC, vessel, lastC);
    if (caution) return setConfirm({ c: valueC, timeText, message: caution });
    setConfirm(null);
    const t = timeText === null ? { at: new Date() } : checkTime(timeText);
    if (t.error) return setErrors({ time: t.error });
    setErrors({});
    const shown = `${site.inputValue(t.at!).slice(11)} ${site.zone()}`;
    const outcome = await logger.log({ takenAt: t.at!.toISOString(), c: valueC, note: note.trim() || undefined });
    setDone(outcome === 'sent' ? `Logged ${valueC.toFixed(1)} °C at ${shown}` : `Saved ${valueC.toFixed(1)} °C at ${shown} on this device`);
    setTemp('');
    setNote('');
    setTimeEdited(false);
    setTime(site.inputValue(new Date()));
  }

  function onLog() {
    const v = Number(temp.trim().replace(',', '.'));
    if (temp.trim() === '' || !Number.isFinite(v)) return setErrors({ c: 'Enter the temperature in °C' });
    if (v < READING_MIN_C || v > READING_MAX_C) return setErrors({ c: `A reactor reading lies between ${READING_MIN_C} and ${READING_MAX_C} °C` });
    // An untouched time field means now: the moment of the tap, seconds included, so readings of one minute keep their order.
    void submit(v, isTimeEdited ? time : null);
  }

  return (
    <Card testID="reading-entry">
      <Text variant="title" accessibilityRole="header">
        Log a reading
      </Text>
      <View style={styles.wrap}>
        <Text variant="small" weight="semibold">
          Reactor temperature, °C
        </Text>
        <TextInput
          accessibilityLabel="Reactor temperature in degrees Celsius"
          testID="reading-c"
          value={temp}
          onChangeText={(s) => {
            setTemp(s);
            setDone(null);
            setConfirm(null);
          }}
          inputMode="decimal"
          keyboardType="decimal-pad"
          placeholder={lastC === null ? '37.0' : lastC.toFixed(1)}
          placeholderTextColor={c.textMuted}
          onSubmitEditing={onLog}
          style={[styles.big, { color: c.text, backgroundColor: c.surface, borderColor: errors.c ? c.danger : c.border, fontFamily: font.semibold }]}
        />
        {errors.c ? (
          <Text variant="small" tone="danger" testID="reading-c-error" accessibilityLiveRegion="polite">
            {errors.c}
          </Text>
        ) : null}
      </View>
      <Field
        label={`Time, site clock (${site.zone()})`}
        testID="reading-time"
        value={time}
        onChangeText={(s) => {
          setTime(s);
          setTimeEdited(true);
        }}
        error={errors.time}
        hint={isTimeEdited ? undefined : 'Now; change it for a reading taken earlier'}
      />
      <Field label="Note (optional)" testID="reading-note" value={note} onChangeText={setNote} maxLength={300} />
      {confirm ? (
        <View style={[styles.confirm, { borderColor: c.warning }]} testID="reading-confirm" accessibilityLiveRegion="polite">
          <Text weight="semibold" tone="warning">
            {confirm.message} Is that what the reactor reads?
          </Text>
          <View style={styles.buttons}>
            <Button
              label={`Log ${confirm.c.toFixed(1)} °C as read`}
              onPress={() => void submit(confirm.c, confirm.timeText, true)}
              testID="reading-confirm-yes"
            />
            <Button label="Change it" variant="secondary" onPress={() => setConfirm(null)} testID="reading-confirm-no" />
          </View>
        </View>
      ) : null}
      <View style={styles.buttons}>
        <Button label="Log reading" onPress={onLog} testID="reading-submit" />
        {lastC !== null ? (
          <Button label={`Repeat ${lastC.toFixed(1)} °C now`} variant="secondary" onPress={() => void submit(lastC, null)} testID="reading-repeat" />
        ) : null}
      </View>
      {done ? (
        <Text variant="small" tone="success" testID="reading-done" accessibilityLiveRegion="polite">
          {done}
        </Text>
      ) : null}
      {logger.queued.length ? (
        <Text variant="small" tone="warning" testID="reading-queue">
          {logger.queued.length} reading{logger.queued.length > 1 ? 's' : ''} saved on this device, waiting for the network
          {logger.isOffline ? ' (offline)' : ''}. They are sent by themselves.
        </Text>
      ) : logger.sentCount ? (
        <Text variant="small" tone="success" testID="reading-sent" accessibilityLiveRegion="polite">
          {logger.sentCount} reading{logger.sentCount > 1 ? 's' : ''} sent
        </Text>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  big: { minHeight: touchTarget * 1.6, borderWidth: 1, borderRadius: radius.md, paddingHorizontal: space.md, ...typeScale.figure },
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  confirm: { borderWidth: 1, borderRadius: radius.md, padding: space.md, gap: space.sm },
});
