"""The DVI/TMDS link: encoders, serialisers, the link clock and the board-level top."""
