# One image for every service: `stemwise serve ingest|compute|report`.
# Node 22 LTS; the project also runs on Node 20 (package.json "engines"), and CI runs the unit tests on both.
FROM node:22-bookworm-slim
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
# No scripts yet: the root's `prepare` (the build) needs the sources, copied below.
RUN npm ci --no-audit --no-fund --ignore-scripts
COPY . .
RUN npm run build
USER node
ENTRYPOINT ["node", "bin/stemwise.mjs"]
CMD ["serve", "all"]
