/**
 * The one chart palette of Bellwether (UX.md, Charts): donor values neutral slate, reference
 * limits teal, their 90% CIs a translucent teal band, outliers amber with a hollow marker.
 */
export const CHART_COLORS = {
  donor: "#73838f",
  donorFill: "rgba(115, 131, 143, 0.45)",
  donorDark: "#3f4d59",
  limit: "#1f7a7a",
  ciBand: "rgba(31, 122, 122, 0.16)",
  ciBorder: "rgba(31, 122, 122, 0.45)",
  fit: "#114f4f",
  outlier: "#b45309",
  grid: "#e4e8ec",
  text: "#3f4d59",
} as const;

export const CHART_FONT = { family: "var(--font-plex), system-ui, sans-serif", size: 12 } as const;
