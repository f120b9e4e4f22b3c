// Dashboard channel: in-process delivery to a callback (the dashboard's live feed).

import type { Channel } from './types.js';
import type { NotificationMessage } from '../messages.js';

export function createDashboardChannel(id: string, deliver: (m: NotificationMessage) => void): Channel {
  return {
    id,
    async send(m: NotificationMessage) {
      deliver(m);
    },
  };
}
