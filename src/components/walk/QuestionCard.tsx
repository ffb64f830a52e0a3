/**
 * One item of the walk-through: the prompt, why it matters, the answer control for its type,
 * a note, photos, and a flag when the result is waiting on it.
 */
import type { AnswerValue, MeasurementValue, WalkQuestion } from '@/lib/api/walk-through';
import { memo, useState } from 'react';
import type { MeasuredAnswerType } from '@/lib/rules/measures';
import { isMeasured } from '@/lib/walk/model';
import type { PhotoRecord } from '@/lib/api/uploads';
import { ChoiceButtons } from './ChoiceButtons';
import { useWalkActions } from './context';
import { YES_NO_NA_LABEL } from '@/lib/vocabulary';
import { MeasureInput } from './MeasureInput';
import { PhotoStrip, type PendingPhoto } from './PhotoStrip';

interface Props {
  question: WalkQuestion;
  areaTitle: string;
  answer: AnswerValue | undefined;
  measurement: MeasurementValue | undefined;
  photos: readonly PhotoRecord[];
  pendingPhotos: readonly PendingPhoto[];
  /** Set when the live result needs this answer. */
  neededBy: number;
}

const yesNoNa = (['yes', 'no', 'na'] as const).map((value) => ({ value, label: YES_NO_NA_LABEL[value] }));

function QuestionCardView({
  question,
  areaTitle,
  answer,
  measurement,
  photos,
  pendingPhotos,
  neededBy,
}: Props) {
  const { sync, units, editable } = useWalkActions();
  const promptId = `q-${question.key}-prompt`;
  const currentNote = (isMeasured(question.answerType) ? measurement?.note : answer?.note) ?? '';
  const [noteOpen, setNoteOpen] = useState(currentNote !== '');
  const hasValue = isMeasured(question.answerType) ? measurement !== undefined : Boolean(answer?.value);

  const setAnswer = (value: string | null) =>
    void sync.edit({
      answers: {
        [question.key]: value === null ? null : { value, ...(answer?.note ? { note: answer.note } : {}) },
      },
    });
  const setMeasurement = (value: MeasurementValue | null) =>
    void sync.edit({ measurements: { [question.key]: value as never } });
  const setNote = (note: string) => {
    if (isMeasured(question.answerType)) {
      if (measurement) setMeasurement({ ...measurement, note });
    } else if (answer) void sync.edit({ answers: { [question.key]: { value: answer.value, note } } });
  };

  let control;
  if (question.answerType === 'yes_no_na') {
    control = (
      <ChoiceButtons
        name={question.key}
        labelledBy={promptId}
        options={yesNoNa}
        value={answer?.value}
        disabled={!editable}
        onChange={setAnswer}
      />
    );
  } else if (question.answerType === 'choice') {
    const options = question.options ?? [];
    control = (
      <ChoiceButtons
        name={question.key}
        labelledBy={promptId}
        options={options.map((o) => ({ value: o.value, label: o.label }))}
        value={answer?.value}
        disabled={!editable}
        columns={options.some((o) => o.label.length > 22) ? 1 : 2}
        onChange={setAnswer}
      />
    );
  } else if (question.answerType === 'date') {
    control = (
      <input
        type="date"
        className="field max-w-52"
        aria-labelledby={promptId}
        value={answer?.value ?? ''}
        disabled={!editable}
        onChange={(e) => setAnswer(e.target.value || null)}
      />
    );
  } else if (question.answerType === 'text') {
    control = (
      <input
        type="text"
        className="field"
        aria-labelledby={promptId}
        maxLength={200}
        defaultValue={answer?.value ?? ''}
        disabled={!editable}
        onChange={(e) => setAnswer(e.target.value.trim() || null)}
      />
    );
  } else {
    control = (
      <MeasureInput
        kind={question.answerType as MeasuredAnswerType}
        labelledBy={promptId}
        value={measurement}
        units={units}
        disabled={!editable}
        {...(question.entryUnits ? { entryUnits: question.entryUnits } : {})}
        onChange={setMeasurement}
      />
    );
  }

  return (
    <article
      id={`q-${question.key}`}
      aria-labelledby={promptId}
      tabIndex={-1}
      className={`card scroll-mt-32 border-l-4 ${neededBy > 0 ? 'border-l-brass-500' : hasValue ? 'border-l-clear' : 'border-l-iron-200'}`}
    >
      <div className="mb-1 flex flex-wrap items-center gap-2 text-xs font-semibold uppercase tracking-wide text-iron-600">
        <span>{areaTitle}</span>
        {neededBy > 0 && (
          <span className="rounded-full bg-brass-100 px-2 py-0.5 normal-case tracking-normal text-iron-900">
            Needed for {neededBy} {neededBy === 1 ? 'rule' : 'rules'}
          </span>
        )}
      </div>
      <h3 id={promptId} className="text-lg leading-snug font-semibold text-iron-900">
        {question.prompt}
      </h3>
      <p className="mt-1 mb-3 text-sm text-iron-600">{question.whyItMatters}</p>
      {control}
      {hasValue && noteOpen && (
        <label className="mt-2 block">
          <span className="label">Note</span>
          <textarea
            className="field min-h-20"
            maxLength={2000}
            defaultValue={currentNote}
            disabled={!editable}
            onChange={(e) => setNote(e.target.value)}
          />
        </label>
      )}
      <PhotoStrip
        itemKey={question.key}
        label={question.prompt}
        photos={photos}
        pending={pendingPhotos}
        before={
          hasValue && !noteOpen ? (
            <button type="button" className="btn-secondary" onClick={() => setNoteOpen(true)}>
              Add a note
            </button>
          ) : null
        }
      />
    </article>
  );
}

export const QuestionCard = memo(QuestionCardView);
