import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { QueryClientProvider } from '@tanstack/react-query';
import { RouterProvider } from 'react-router/dom';
import { createQueryClient } from './api/query-client';
import { connectCsrfToSession } from './api/session';
import { createRouter } from './routes/router';
import './index.css';

const container = document.getElementById('root');
if (!container) throw new Error('Cartouche cannot start: the page has no element with id "root".');

const queryClient = createQueryClient();
connectCsrfToSession(queryClient);
const router = createRouter(queryClient);

createRoot(container).render(
  <StrictMode>
    <QueryClientProvider client={queryClient}>
      <RouterProvider router={router} />
    </QueryClientProvider>
  </StrictMode>,
);
