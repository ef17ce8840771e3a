"""The balances: the terms every kind of balance shares, and each kind's own."""
