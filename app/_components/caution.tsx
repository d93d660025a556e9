import { DECISION_AID_NOTE, SAFETY_CAUTIONS } from "@/lib/health/safety";

export interface CautionProps {
  compact?: boolean;
}

/** The decision-aid note and the bench-safety cautions, shown wherever a score is shown. */
export function Caution({ compact = false }: CautionProps) {
  return (
    <div className="caution" role="note">
      <strong>{DECISION_AID_NOTE}</strong>
      {compact ? null : (
        <ul>
          {SAFETY_CAUTIONS.map((c) => (
            <li key={c}>{c}</li>
          ))}
        </ul>
      )}
    </div>
  );
}
