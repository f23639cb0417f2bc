package net.zbin.core;

/** The meter's own verdict on a reading. Anything but OK keeps the part out of value bins. */
public enum MeterStatus { OK, OVERLOAD, NOT_OK }
