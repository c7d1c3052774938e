"use client";

import { useFormContext } from "react-hook-form";
import type { AnalysisFormValues } from "@/components/analyses/analysis-form-schema";
import { SelectField } from "@/components/ui/select-field";
import {
  DECIMAL_MARKS,
  DELIMITERS,
  TEXT_ENCODINGS,
  type CsvFormat,
  type DecimalMark,
  type Delimiter,
  type TextEncodingName,
} from "@/lib/analysis/browser";

const ENCODING_NAMES: Record<TextEncodingName, string> = {
  "utf-8": "UTF-8",
  "windows-1252": "Windows-1252 (Latin-1)",
  "utf-16": "UTF-16 (with byte-order mark)",
};
const DELIMITER_NAMES: Record<Delimiter, string> = {
  ",": "Comma (,)",
  ";": "Semicolon (;)",
  "\t": "Tab",
};
const DECIMAL_MARK_NAMES: Record<DecimalMark, string> = {
  ".": "Point (17.99)",
  ",": "Comma (17,99)",
};

/**
 * Options of a drop-down whose detected value leads, marked as detected. For the delimiter and
 * decimal mark the detected one is the empty value (the engine detects it again, as the preview
 * did); a saved choice equal to it stays listed so a re-run shows what it used.
 */
function ReadingOptions<Value extends string>({
  values,
  names,
  detected,
  current,
  detectedValue,
}: {
  values: readonly Value[];
  names: Record<Value, string>;
  detected: Value;
  current: string;
  detectedValue: "" | Value;
}) {
  return (
    <>
      <option value={detectedValue}>{names[detected]} — detected</option>
      {values
        .filter((value) => value !== detected || (detectedValue === "" && current === value))
        .map((value) => (
          <option key={value} value={value}>
            {names[value]}
          </option>
        ))}
    </>
  );
}

/**
 * How the dataset's text is read (methods.md §1), preselected to what the upload's preview
 * detected, and what happens to values that are not numbers in a numeric column. Changing a
 * choice re-reads the preview (`reading`), so the columns below are those the run will see.
 */
export function ReadingFieldset({
  detected,
  values,
  reading,
  error,
}: {
  detected: CsvFormat;
  values: AnalysisFormValues["options"];
  reading: boolean;
  error: string | undefined;
}) {
  const { register } = useFormContext<AnalysisFormValues>();
  return (
    <fieldset className="space-y-3" aria-describedby="reading-status">
      <legend className="text-sm font-medium">Reading the file</legend>
      <div className="grid gap-4 md:grid-cols-3">
        <SelectField id="encoding" label="Text encoding" {...register("options.encoding")}>
          <ReadingOptions
            values={TEXT_ENCODINGS}
            names={ENCODING_NAMES}
            detected={detected.encoding}
            current={values.encoding}
            detectedValue={detected.encoding}
          />
        </SelectField>
        <SelectField id="delimiter" label="Delimiter" {...register("options.delimiter")}>
          <ReadingOptions
            values={DELIMITERS}
            names={DELIMITER_NAMES}
            detected={detected.delimiter}
            current={values.delimiter}
            detectedValue=""
          />
        </SelectField>
        <SelectField id="decimal-mark" label="Decimal mark" {...register("options.decimalMark")}>
          <ReadingOptions
            values={DECIMAL_MARKS}
            names={DECIMAL_MARK_NAMES}
            detected={detected.decimalMark}
            current={values.decimalMark}
            detectedValue=""
          />
        </SelectField>
      </div>
      {error ? (
        <p id="reading-status" role="alert" className="text-sm text-cadmium">
          {error} The preview below is read with the detected choices.
        </p>
      ) : (
        <p id="reading-status" className="text-xs text-ink-soft" aria-live="polite">
          {reading
            ? "Reading the file again with these choices…"
            : "The preview and the columns below are read with these choices; the report states them."}
        </p>
      )}
      <label className="flex items-start gap-2 text-sm">
        <input
          type="checkbox"
          className="mt-1 accent-indigo"
          {...register("options.badNumbersAsMissing")}
        />
        <span>
          Count values that are not numbers in a numeric column (such as “Inf” or “abc”) as missing
          <span className="block text-xs text-ink-soft">
            Otherwise the run stops and names the column, its first such rows and how many there
            are. Text columns with more than 32 distinct values are left out with a warning.
          </span>
        </span>
      </label>
    </fieldset>
  );
}
