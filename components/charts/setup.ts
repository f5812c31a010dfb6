"use client";

import {
  BarController,
  BarElement,
  CategoryScale,
  Chart,
  Filler,
  Legend,
  LinearScale,
  LineController,
  LineElement,
  PointElement,
  ScatterController,
  Tooltip,
} from "chart.js";
import annotationPlugin from "chartjs-plugin-annotation";
import { CHART_COLORS } from "./palette";

let registered = false;

/** Registers the parts of Chart.js the study charts use, once per page. */
export function registerCharts(): void {
  if (registered) return;
  Chart.register(
    BarController,
    BarElement,
    CategoryScale,
    LinearScale,
    LineController,
    LineElement,
    PointElement,
    ScatterController,
    Filler,
    Legend,
    Tooltip,
    annotationPlugin,
  );
  Chart.defaults.color = CHART_COLORS.text;
  Chart.defaults.font.family = "IBM Plex Sans Variable, system-ui, sans-serif";
  Chart.defaults.font.size = 12;
  Chart.defaults.animation = false;
  registered = true;
}
