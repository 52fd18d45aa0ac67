/** The plain statement every report and summary carries about what a forecast is. */
export const FORECAST_CAUTION =
  'Forecasts are statistical extrapolations under the asserted model: they assume the fitted equation keeps holding. ' +
  'They are not physical climate projections and not financial advice.';
