/** The population of interest, by name (default: the first): the forecast's chooser. */
export { choosePopulation as pickPopulation } from '../forecast/forecast.js';
