// Formatting for display. The API speaks SI (Hz, ohms, seconds); MHz appear only here.

export const MHZ = 1e6;

export function mhz(hz, digits = 3) {
  if (hz === null || hz === undefined || !Number.isFinite(hz)) return "—";
  return `${(hz / MHZ).toFixed(digits)} MHz`;
}

export function khz(hz) {
  if (hz === null || hz === undefined || !Number.isFinite(hz)) return "—";
  return Math.abs(hz) >= MHZ ? `${(hz / MHZ).toFixed(3)} MHz` : `${(hz / 1e3).toFixed(1)} kHz`;
}

/** SWR: `null` from the API means infinite (|Γ| ≥ 1), shown as ∞. */
export function swr(value, digits = 2) {
  if (value === null) return "∞";
  if (value === undefined || !Number.isFinite(value)) return "—";
  return value.toFixed(digits);
}

/** Whether a band's centre lies in the sweep: the board says so (`centre_swept`); a full
 *  metrics row shows it by its centre values, all `null` (return loss too) when not. */
export function centreSwept(row) {
  if (typeof row.centre_swept === "boolean") return row.centre_swept;
  const rl = row.return_loss_center_db;
  return !(row.swr_center === null && (rl === null || rl === undefined));
}

/** SWR at a band's centre from its metrics row: `null` is ∞ only when the centre was
 *  swept; when it was not, it shows — (not measured). */
export function swrAtCentre(row, digits = 2) {
  return centreSwept(row) ? swr(row.swr_center, digits) : "—";
}

/** Min SWR over a band from its metrics row: — for a band the sweep does not reach. */
export function minSwrInBand(row, digits = 2) {
  return row.coverage > 0 ? swr(row.min_swr, digits) : "—";
}

export function num(value, digits = 2, unit = "") {
  if (value === null || value === undefined || !Number.isFinite(value)) return "—";
  // A true minus sign, and no "−0.0" for a value that rounds to zero.
  const shown = Math.abs(value).toFixed(digits);
  const sign = value < 0 && Number(shown) !== 0 ? "−" : "";
  return `${sign}${shown}${unit ? ` ${unit}` : ""}`;
}

/** Impedance as "R + jX Ω" (the sign goes between, never "+ j-3"). */
export function impedance(r, x, digits = 2) {
  if (!Number.isFinite(r) || !Number.isFinite(x)) return "—";
  const sign = x < 0 ? "−" : "+";
  return `${r.toFixed(digits)} ${sign} j${Math.abs(x).toFixed(digits)} Ω`;
}

export function date(iso) {
  if (!iso) return "—";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return String(iso);
  return d.toISOString().slice(0, 10);
}

export function dateTime(iso) {
  if (!iso) return "—";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return String(iso);
  return `${d.toISOString().slice(0, 16).replace("T", " ")} UTC`;
}

/** Age in whole days between an ISO time and now. */
export function ageDays(iso, now = Date.now()) {
  if (!iso) return null;
  const t = new Date(iso).getTime();
  return Number.isNaN(t) ? null : Math.floor((now - t) / 86400e3);
}

export function age(iso) {
  const days = ageDays(iso);
  if (days === null) return "never";
  if (days < 1) return "today";
  if (days < 60) return `${days} d ago`;
  if (days < 730) return `${Math.round(days / 30.4)} months ago`;
  return `${(days / 365.25).toFixed(1)} years ago`;
}

/** A local datetime-local input value ("YYYY-MM-DDTHH:MM") for a Date. */
export function localInput(d = new Date()) {
  const pad = (n) => String(n).padStart(2, "0");
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

export function bytes(n) {
  if (n < 1024) return `${n} B`;
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(1)} KiB`;
  return `${(n / 1024 / 1024).toFixed(1)} MiB`;
}
