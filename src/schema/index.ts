export { HealthResponse, SiteSummary } from './health';
