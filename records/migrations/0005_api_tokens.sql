-- 0005: per-user API tokens, issued and revoked by an admin. Only a hash of
-- each token is stored; a token acts with its user's roles.
CREATE TABLE api_tokens (
    id          INTEGER PRIMARY KEY,
    user_id     INTEGER NOT NULL REFERENCES users(id),
    label       TEXT    NOT NULL,
    token_hash  TEXT    NOT NULL UNIQUE,
    created_by  INTEGER REFERENCES users(id),
    created_at  TEXT    NOT NULL,
    revoked_at  TEXT,
    revoked_by  INTEGER REFERENCES users(id),
    last_used   TEXT
);
CREATE INDEX api_tokens_user ON api_tokens(user_id);
