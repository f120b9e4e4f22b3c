// Small formatting helpers shared by the dashboard modules.

export const METRICS = [
  { key: 'pco2_uatm', type: 'carbonate', label: 'pCO₂', unit: 'µatm', dp: 0, color: '#c4421a' },
  { key: 'o2_mg_l', type: 'oxygen', label: 'O₂', unit: 'mg/L', dp: 2, color: '#00717f', alarmBelow: 2 },
  { key: 'omega_ar', type: 'carbonate', label: 'Ω arag', unit: '', dp: 2, color: '#6b3fa0', alarmBelow: 3 },
  { key: 'ph_total', type: 'carbonate', label: 'pH (total)', unit: '', dp: 3, color: '#8a5a00' },
  { key: 'temp_c', type: 'carbonate', label: 'Temp', unit: '°C', dp: 2, color: '#b0221b' },
  { key: 'hm0_m', type: 'waves', label: 'Hm0', unit: 'm', dp: 2, color: '#10344a' },
  { key: 'speed_m_s', type: 'current', label: 'Current', unit: 'm/s', dp: 3, color: '#1b7b3a' },
];

export function fmt(v, dp) {
  return typeof v === 'number' && Number.isFinite(v) ? v.toFixed(dp) : '—';
}

export function el(tag, attrs = {}, ...children) {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) {
    if (k === 'class') e.className = v;
    else if (k === 'text') e.textContent = v;
    else if (v !== undefined && v !== null && v !== false) e.setAttribute(k, v === true ? '' : String(v));
  }
  for (const c of children) if (c !== null && c !== undefined) e.append(c);
  return e;
}

export function timeUtc(iso) {
  if (!iso) return '—';
  const d = new Date(iso);
  return `${String(d.getUTCHours()).padStart(2, '0')}:${String(d.getUTCMinutes()).padStart(2, '0')}`;
}

export function dateTimeUtc(iso) {
  if (!iso) return '—';
  const d = new Date(iso);
  return `${d.toISOString().slice(5, 10)} ${timeUtc(iso)}`;
}

export function age(ms) {
  if (!Number.isFinite(ms)) return 'never';
  const m = Math.max(0, Math.round(ms / 60000));
  if (m < 1) return 'now';
  if (m < 90) return `${m} min ago`;
  const h = m / 60;
  if (h < 48) return `${h.toFixed(1)} h ago`;
  return `${Math.round(h / 24)} d ago`;
}

/** fresh (< 3 reporting intervals), late (< 1 h), stale, or none. */
export function freshness(ms) {
  if (!Number.isFinite(ms)) return 'stale';
  if (ms <= 20 * 60000) return 'ok';
  if (ms <= 60 * 60000) return 'late';
  return 'stale';
}
