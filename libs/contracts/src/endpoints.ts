import { authEndpoints } from './auth.endpoints';
import { countersEndpoints } from './counters.endpoints';
import { exceptionsEndpoints } from './exceptions.endpoints';
import { farmsEndpoints } from './farms.endpoints';
import { flocksEndpoints } from './flocks.endpoints';
import { gatewaysEndpoints } from './gateways.endpoints';
import { housesEndpoints } from './houses.endpoints';
import { importsEndpoints } from './imports.endpoints';
import { ingestEndpoints } from './ingest.endpoints';
import { notificationsEndpoints } from './notifications.endpoints';
import { reportsEndpoints } from './reports.endpoints';
import { usersEndpoints } from './users.endpoints';
import { workOrdersEndpoints } from './work-orders.endpoints';

/**
 * Every route of `/api/v1`, by feature: the API declares its routes with these (adding handlers), and the web
 * app calls them through its client. Health and the API document itself live outside `/api/v1`.
 */
export const endpoints = {
  auth: authEndpoints,
  farms: farmsEndpoints,
  houses: housesEndpoints,
  users: usersEndpoints,
  gateways: gatewaysEndpoints,
  counters: countersEndpoints,
  exceptions: exceptionsEndpoints,
  workOrders: workOrdersEndpoints,
  notifications: notificationsEndpoints,
  flocks: flocksEndpoints,
  reports: reportsEndpoints,
  imports: importsEndpoints,
  ingest: ingestEndpoints,
};
