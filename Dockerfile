# One image for every service: `stemwise serve ingest|compute|report`.
FROM node:20-bookworm-slim
WORKDIR /app
COPY package.json package-lock.json ./
COPY platform/package.json platform/
COPY db/package.json db/
COPY core/package.json core/
COPY services/ingest/package.json services/ingest/
COPY services/compute/package.json services/compute/
COPY services/report/package.json services/report/
COPY cli/package.json cli/
COPY demo-inventory/package.json demo-inventory/
RUN npm ci --no-audit --no-fund
COPY . .
RUN npm run build
USER node
ENTRYPOINT ["node", "bin/stemwise.mjs"]
CMD ["serve", "all"]
