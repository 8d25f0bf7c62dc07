/* The offline queue of torque readings: built in issue 8. */
