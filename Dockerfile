# One image for every Rainprint process (app, worker, migrations, stand-ins);
# docker-compose.yml picks the command.
FROM node:20-bookworm-slim
WORKDIR /app
COPY package.json package-lock.json ./
RUN npm ci --no-audit --no-fund
COPY . .
ENV NEXT_TELEMETRY_DISABLED=1
RUN node_modules/.bin/next build
EXPOSE 3000
CMD ["node_modules/.bin/next", "start", "-p", "3000"]
