import type { InputHTMLAttributes } from "react";

export interface SelectFieldProps {
  label: string;
  name: string;
  /** Plain strings (value = label) or value/label pairs. */
  options: readonly (string | { value: string; label: string })[];
  defaultValue?: string;
  ariaLabel?: string;
}

/** A labelled <select> for a form field. */
export function SelectField({ label, name, options, defaultValue, ariaLabel }: SelectFieldProps) {
  return (
    <label>
      {label}
      <select name={name} defaultValue={defaultValue} aria-label={ariaLabel}>
        {options.map((o) =>
          typeof o === "string" ? (
            <option key={o}>{o}</option>
          ) : (
            <option key={o.value} value={o.value}>
              {o.label}
            </option>
          ),
        )}
      </select>
    </label>
  );
}

export interface TextFieldProps extends InputHTMLAttributes<HTMLInputElement> {
  label: string;
  name: string;
}

/** A labelled <input> for a form field. */
export function TextField({ label, ...input }: TextFieldProps) {
  return (
    <label>
      {label}
      <input {...input} />
    </label>
  );
}
