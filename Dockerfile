# Mastwatch server image: the app on PostgreSQL (docker-compose.yml) or on SQLite in /data.
FROM python:3.11-slim

ENV PYTHONDONTWRITEBYTECODE=1 PYTHONUNBUFFERED=1 \
    MASTWATCH_DATA_DIR=/data

WORKDIR /app
COPY pyproject.toml README.md ./
COPY backend ./backend
COPY frontend ./frontend
COPY migrations ./migrations
# Editable: the app finds frontend/ and migrations/ beside the package, as in a checkout.
RUN pip install --no-cache-dir -e .

RUN useradd --system --home /data mastwatch && mkdir -p /data && chown mastwatch /data
USER mastwatch
VOLUME /data
EXPOSE 8000

# Migrate, then serve; `mastwatch serve` refuses a database that is behind its migrations.
CMD ["sh", "-c", "mastwatch db upgrade && mastwatch serve --host 0.0.0.0 --port 8000"]
