// Error catalogue of services/dashboard: the codes of its HTTP error answers ({error, message}, OpenAPI
// schema `Error`), each with what the client should change.
import { defineErrors } from '../../libs/contract/errors.js';

export const DASHBOARD_ERRORS = defineErrors('services/dashboard', {
  REEFD_DASHBOARD_BAD_QUERY:
    'a query parameter is not valid (the message names it); see /openapi.json for the form',
  REEFD_DASHBOARD_JSON_ONLY: 'the body must be application/json',
  REEFD_DASHBOARD_CROSS_ORIGIN: 'a write from another origin is refused; use the dashboard page itself',
  REEFD_DASHBOARD_BAD_BODY: 'the body is not the JSON object the endpoint takes (see /openapi.json)',
  REEFD_DASHBOARD_ACK_NAME: 'an acknowledgement needs the name of who acknowledges (1 to 64 characters)',
  REEFD_DASHBOARD_UNAUTHORIZED:
    'writes need the dashboard token (dashboard.token); send it as a bearer token',
  REEFD_DASHBOARD_NOT_FOUND: 'nothing at that path; see /openapi.json for the endpoints',
  REEFD_DASHBOARD_METHOD: 'the dashboard answers GET and POST only',
  REEFD_DASHBOARD_INTERNAL:
    'the request failed inside the daemon; the daemon log has the error with its code',
  REEFD_DASHBOARD_NO_ALERT: 'no active or recent alert has that id; reload the page for the current alerts',
  REEFD_DASHBOARD_NO_ACK_STORE: 'this daemon keeps no acknowledgements (no data folder); run with a data_dir',
});
export type DashboardErrorCode = (typeof DASHBOARD_ERRORS.codes)[number];
