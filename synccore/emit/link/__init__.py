"""The DVI/TMDS link: the TMDS encoder, the link core, the serialisers, the link clocks and the DVI top."""
