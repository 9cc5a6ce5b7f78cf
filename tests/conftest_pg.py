"""PostgreSQL fixtures for tests marked ``@pytest.mark.postgres`` (loaded with ``pytest_plugins``).

The server comes from ``FLUXLEDGER_TEST_PG_URL`` (a SQLAlchemy URL whose user may create
databases, e.g. ``postgresql+psycopg://postgres@127.0.0.1:54329/fluxledger_test``). One fresh
database is created per test session and dropped at the end; each test works in its own schema
(``search_path`` set in the URL), dropped after the test. Without a reachable server the tests
are skipped with the reason shown; with ``CI=true`` a missing server is a failure, so CI cannot
pass by skipping them.
"""

from __future__ import annotations

import itertools
import os
import uuid
from collections.abc import Iterator

import pytest
from sqlalchemy import create_engine, make_url, text

PG_URL_ENV = "FLUXLEDGER_TEST_PG_URL"
_COUNTER = itertools.count(1)


def _in_ci() -> bool:
    return os.environ.get("CI", "").strip().lower() in {"1", "true", "yes"}


def _unavailable(reason: str) -> None:
    if _in_ci():
        pytest.fail(f"CI=true but PostgreSQL tests cannot run: {reason}", pytrace=False)
    pytest.skip(f"no PostgreSQL server: {reason}")


def _admin_engine(url: str):  # type: ignore[no-untyped-def]
    return create_engine(url, isolation_level="AUTOCOMMIT", connect_args={"connect_timeout": 5})


@pytest.fixture(scope="session")
def pg_session_url() -> Iterator[str]:
    """A database created for this test session (with the RDKit cartridge when the server has it)."""
    base = os.environ.get(PG_URL_ENV, "").strip()
    if not base:
        _unavailable(f"set {PG_URL_ENV}=postgresql+psycopg://user@host:port/database")
    from registry.storage.database import to_url

    base = to_url(base)
    admin = _admin_engine(base)
    try:
        with admin.connect() as conn:
            conn.exec_driver_sql("SELECT 1")
    except Exception as exc:
        admin.dispose()
        first_line = str(exc).strip().splitlines()[0] if str(exc).strip() else repr(exc)
        _unavailable(f"{make_url(base).render_as_string()} is not reachable ({first_line})")
    name = f"fluxledger_test_{os.getpid()}_{uuid.uuid4().hex[:8]}"
    with admin.connect() as conn:
        conn.exec_driver_sql(f'CREATE DATABASE "{name}"')
    url = make_url(base).set(database=name).render_as_string(hide_password=False)
    session = _admin_engine(url)
    with session.connect() as conn:
        available = conn.exec_driver_sql(
            "SELECT 1 FROM pg_available_extensions WHERE name = 'rdkit'"
        ).scalar()
        if available:
            conn.exec_driver_sql("CREATE EXTENSION IF NOT EXISTS rdkit")
    session.dispose()
    try:
        yield url
    finally:
        with admin.connect() as conn:
            conn.exec_driver_sql(f'DROP DATABASE IF EXISTS "{name}" WITH (FORCE)')
        admin.dispose()


@pytest.fixture
def pg_url(pg_session_url: str) -> Iterator[str]:
    """A URL whose connections work in a fresh schema of the session database (dropped after)."""
    schema = f"t{next(_COUNTER)}_{uuid.uuid4().hex[:6]}"
    admin = _admin_engine(pg_session_url)
    with admin.connect() as conn:
        conn.exec_driver_sql(f'CREATE SCHEMA "{schema}"')
    url = (
        make_url(pg_session_url)
        .update_query_dict(
            {"options": f"-csearch_path={schema},public", "application_name": schema}
        )
        .render_as_string(hide_password=False)
    )
    try:
        yield url
    finally:
        with admin.connect() as conn:
            conn.execute(
                text(
                    "SELECT pg_terminate_backend(pid) FROM pg_stat_activity "
                    "WHERE application_name = :app AND pid <> pg_backend_pid()"
                ),
                {"app": schema},
            )
            conn.exec_driver_sql(f'DROP SCHEMA "{schema}" CASCADE')
        admin.dispose()


@pytest.fixture
def pg_cartridge(pg_url: str) -> str:
    """``pg_url``, but the test needs the RDKit cartridge (a failure in CI when it is missing)."""
    engine = _admin_engine(pg_url)
    try:
        with engine.connect() as conn:
            have = conn.exec_driver_sql(
                "SELECT 1 FROM pg_extension WHERE extname = 'rdkit'"
            ).scalar()
    finally:
        engine.dispose()
    if not have:
        _unavailable("the server has no RDKit cartridge (Debian package postgresql-15-rdkit)")
    return pg_url
